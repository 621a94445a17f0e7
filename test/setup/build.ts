// Builds dist/ once before the tests that run the real CLI and server as subprocesses.
import { execFileSync } from 'node:child_process';
import * as path from 'node:path';

export default function setup(): void {
  execFileSync(process.execPath, [path.join(__dirname, '../../scripts/build.mjs'), '--quiet'], { cwd: path.join(__dirname, '../..'), stdio: 'inherit' });
}
