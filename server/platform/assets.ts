import fs from 'node:fs';
import path from 'node:path';
import { PROJECT_ROOT } from './project-root';

export const CLIENT_DIST = path.join(PROJECT_ROOT, 'client', 'dist');
const MANIFEST = path.join(CLIENT_DIST, '.vite/manifest.json');

export interface OfficeAssets {
  css: string[];
  js: string[];
  dev: boolean;
}

interface ManifestEntry {
  file: string;
  css?: string[];
  isEntry?: boolean;
}

/** The office pages' stylesheet and script, by their hashed names in the Vite manifest. */
export function readOfficeAssets(dev: boolean): OfficeAssets {
  if (dev) return { css: [], js: ['/static/@vite/client', '/static/office.ts'], dev };
  try {
    const manifest = JSON.parse(fs.readFileSync(MANIFEST, 'utf8')) as Record<string, ManifestEntry>;
    const entry = manifest['office.ts'];
    if (!entry) return { css: [], js: [], dev };
    return { css: (entry.css ?? []).map((f) => `/static/${f}`), js: [`/static/${entry.file}`], dev };
  } catch {
    return { css: [], js: [], dev }; // not built yet: pages still work, unstyled
  }
}

export const clientIsBuilt = () => fs.existsSync(MANIFEST) && fs.existsSync(path.join(CLIENT_DIST, 'index.html'));
