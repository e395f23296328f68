/** Config texts that several tests start from (each test edits its copy with replace or appends sections). */

/** A free Gaussian packet in a 1D box of 256 cells, moving at 30 km/s for 10 Myr (no gravity: analytic spreading). */
export const FREE_PACKET_1D = `
[grid]
cells = 256
box = "20 kpc"
gravity = "none"

[particle]
mass = "1e-22 eV"

[span]
duration = "10 Myr"

[initial]
kind = "gaussian-packet"
mass = "1e8 Msun"
width = "0.5 kpc"
center = ["6 kpc"]
velocity = ["30 km/s"]
`;

/** A 2D static periodic box of 32² cells with a 30% plane wave along the diagonal, for 60 Myr (nonlinear within the span). */
export const PLANE_WAVE_2D = `[grid]
cells = [32, 32]
box = "20 kpc"
[particle]
mass = "1e-22 eV"
[span]
duration = "60 Myr"
[initial]
kind = "plane-wave"
mean_density = "1e7 Msun/kpc^3"
contrast = 0.3
mode = [1, 1]
`;
