// The engine reads files only through this interface, so the CLI (disk), the language server
// (open documents first, then disk) and the tests (in-memory maps) supply their own.

export interface FileHost {
  /** The file's text, or undefined when it does not exist or cannot be read. */
  readFile(path: string): string | undefined;
  /** Joins a name written in a netlist to the directory of the file that wrote it. */
  resolve(fromFile: string, name: string): string;
  /** Extra directories to search for includes, in order. */
  includePaths?: readonly string[];
}

/** A host over an in-memory map of path -> text, with '/' separated paths. */
export function memoryHost(files: Record<string, string>, includePaths: string[] = []): FileHost {
  return {
    readFile: (p) => files[normalise(p)],
    resolve: (from, name) => (name.startsWith('/') ? normalise(name) : normalise(dirname(from) + '/' + name)),
    includePaths,
  };
}

function dirname(p: string): string {
  const i = p.lastIndexOf('/');
  return i < 0 ? '.' : p.slice(0, i) || '/';
}

function normalise(p: string): string {
  const abs = p.startsWith('/');
  const out: string[] = [];
  for (const part of p.split('/')) {
    if (part === '' || part === '.') continue;
    if (part === '..' && out.length && out[out.length - 1] !== '..') out.pop();
    else out.push(part);
  }
  return (abs ? '/' : '') + out.join('/');
}
