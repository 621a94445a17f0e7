// The CLI's file host: the local disk. Paths stay as the user wrote them (relative to the
// working directory) so reports name files the way the user named them.

import * as fs from 'node:fs';
import * as path from 'node:path';
import type { FileHost } from '../core/host';

export function diskHost(includePaths: string[] = []): FileHost {
  const cache = new Map<string, string | undefined>();
  return {
    readFile(p) {
      if (cache.has(p)) return cache.get(p);
      let text: string | undefined;
      try {
        text = fs.statSync(p).isFile() ? fs.readFileSync(p, 'utf8') : undefined;
      } catch {
        text = undefined;
      }
      cache.set(p, text);
      return text;
    },
    resolve(from, name) {
      const expanded = name.startsWith('~/') ? path.join(process.env['HOME'] ?? '', name.slice(2)) : name;
      return path.isAbsolute(expanded) ? path.normalize(expanded) : path.normalize(path.join(path.dirname(from), expanded));
    },
    includePaths,
  };
}
