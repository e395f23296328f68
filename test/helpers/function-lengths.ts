/** Lengths in lines of every function, method, constructor, accessor and arrow function of a TypeScript source. */
import ts from "typescript";

export interface FunctionLength {
  /** A readable name: Class.method, function, or "(arrow)" with its enclosing name. */
  readonly name: string;
  readonly line: number;
  readonly lines: number;
}

function nameOf(node: ts.Node, source: ts.SourceFile): string {
  const named = (n: ts.Node): string | undefined => {
    const id = (n as { name?: ts.Node }).name;
    return id ? id.getText(source) : undefined;
  };
  const own = named(node) ?? (ts.isConstructorDeclaration(node) ? "constructor" : undefined);
  let outer: ts.Node | undefined = node.parent;
  while (outer && !ts.isClassLike(outer) && !ts.isFunctionLike(outer) && !ts.isVariableDeclaration(outer) && !ts.isPropertyAssignment(outer)) outer = outer.parent;
  const context = outer ? named(outer) : undefined;
  if (own) return context && ts.isClassLike(outer!) ? `${context}.${own}` : own;
  if (outer && context && (ts.isVariableDeclaration(outer) || ts.isPropertyAssignment(outer))) return context;
  return context ? `${context} (function)` : "(function)";
}

/** Every function-like node with a body, with its length from its first to its last line. */
export function functionLengths(fileName: string, text: string): FunctionLength[] {
  const source = ts.createSourceFile(fileName, text, ts.ScriptTarget.ES2022, true);
  const out: FunctionLength[] = [];
  const visit = (node: ts.Node): void => {
    if (ts.isFunctionLike(node) && (node as { body?: ts.Node }).body) {
      const start = source.getLineAndCharacterOfPosition(node.getStart(source)).line;
      const end = source.getLineAndCharacterOfPosition(node.getEnd()).line;
      out.push({ name: nameOf(node, source), line: start + 1, lines: end - start + 1 });
    }
    ts.forEachChild(node, visit);
  };
  visit(source);
  return out;
}
