// Builds the CLI bundle once so that CLI tests run the same code a user runs.
import { execFileSync } from 'node:child_process';

export default function setup(): void {
  execFileSync(process.execPath, ['scripts/build.mjs'], { stdio: 'inherit' });
}
