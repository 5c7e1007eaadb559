// Resolves Coilpath's own imports to files for eslint-plugin-boundaries: relative paths and the web's `@/`
// alias (apps/web/src, as in apps/web/tsconfig.json and vite.config.ts). Packages are left unresolved, so the
// plugin treats them as external.
const fs = require('node:fs');
const path = require('node:path');

const webSrc = path.join(__dirname, 'apps/web/src');
const endings = ['', '.ts', '.tsx', '.d.ts', '.js', '/index.ts', '/index.tsx'];

function resolve(source, file) {
  let base;
  if (source.startsWith('@/')) base = path.join(webSrc, source.slice(2));
  else if (source.startsWith('.')) base = path.resolve(path.dirname(file), source);
  else return { found: false };
  for (const end of endings) {
    const candidate = base + end;
    if (fs.existsSync(candidate) && fs.statSync(candidate).isFile()) return { found: true, path: candidate };
  }
  return { found: false };
}

module.exports = { interfaceVersion: 2, resolve };
