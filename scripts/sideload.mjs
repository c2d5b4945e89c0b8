// npm run sideload: opens Excel with Tailmark's manifest using Office's own tooling
// (office-addin-debugging) when it is installed; otherwise prints the manual steps.
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const manifest = path.join(root, 'manifest.xml');
const tool = path.join(root, 'node_modules', '.bin', 'office-addin-debugging');

const steps = `Sideloading Tailmark into Excel
  1. Trust a localhost certificate once: npx office-addin-dev-certs install
  2. Build and serve over HTTPS:        npm run build && npm run serve:https
     (the pane must be at https://localhost:3000/taskpane.html)
  3. Add the manifest:
     - Excel on the web: Home > Add-ins > More add-ins > My add-ins > Upload my add-in > ${manifest}
     - Excel on Windows: put manifest.xml in a shared network folder, add it under File > Options >
       Trust Center > Trusted Add-in Catalogs, then Home > Add-ins > Shared folder.
     - Excel on Mac: copy manifest.xml to ~/Library/Containers/com.microsoft.Excel/Data/Documents/wef/
  4. Press "Tailmark" in the "Claim review" group of the Home tab.
  With Office's tooling installed (npm i -D office-addin-debugging), "npm run sideload" does steps 3-4:
     office-addin-debugging start manifest.xml desktop --app excel`;

if (existsSync(tool)) {
  const r = spawnSync(tool, ['start', manifest, 'desktop', '--app', 'excel', '--no-debug'], { stdio: 'inherit' });
  process.exit(r.status ?? 1);
} else {
  console.log(steps);
}
