#!/usr/bin/env node
// Entry point: the compiled command line (built by `npm ci` through the prepare script).
import('../.build/cli/main.js').catch((err) => {
  if (err && err.code === 'ERR_MODULE_NOT_FOUND') {
    process.stderr.write('rupta is not built yet: run `npm ci` (or `npm run build`) in the project folder first.\n');
    process.exit(2);
  }
  throw err;
});
