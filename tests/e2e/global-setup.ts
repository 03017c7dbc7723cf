import { execFileSync } from 'node:child_process';

/** Browser tests run against the built client, exactly as `npm start` serves it. */
export default function setup() {
  execFileSync(process.execPath, ['node_modules/vite/bin/vite.js', 'build', '--logLevel', 'warn'], { stdio: 'inherit' });
}
