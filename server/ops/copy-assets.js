// tsc compiles .ts only: copy the plain .mjs worker files (glpk.js and HiGHS are ES modules that
// must be loaded outside of CommonJS) next to their compiled siblings in dist/.
const fs = require('node:fs');
const path = require('node:path');

const root = path.join(__dirname, '..', '..');
function copyMjs(dir) {
  for (const entry of fs.readdirSync(path.join(root, dir), { withFileTypes: true })) {
    const rel = path.join(dir, entry.name);
    if (entry.isDirectory()) copyMjs(rel);
    else if (entry.name.endsWith('.mjs')) {
      fs.mkdirSync(path.join(root, 'dist', dir), { recursive: true });
      fs.copyFileSync(path.join(root, rel), path.join(root, 'dist', rel));
    }
  }
}
copyMjs('server');
