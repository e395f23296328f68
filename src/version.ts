/** psibox's version, as in package.json (checked by a test). */
export const VERSION = "0.1.0";
