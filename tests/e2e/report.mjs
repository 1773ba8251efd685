// "Export report": one PNG at 2× pixel density, the residuals CSV and the JSON summary beside it.
// The PNG is decoded here (chunks, zlib inflate of the IDAT data, scanline filters; PNG specification,
// ISO/IEC 15948, sections 5, 9 and 11) to probe that the plots and the 3D view are not blank.
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { inflateSync } from 'node:zlib';
import { createHash } from 'node:crypto';
import { check, dropFile, openFresh, statsNumber, waitComparison, waitStatus, waitViewComparison } from './_helpers.mjs';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const PNG_SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];

/** The PNG's header fields and its pixels as RGBA bytes (8-bit RGB or RGBA, not interlaced). */
export function pngDecode(buf) {
  for (let i = 0; i < 8; i++) if (buf[i] !== PNG_SIGNATURE[i]) throw new Error(`not a PNG: byte ${i} is ${buf[i]}`);
  let at = 8;
  let ihdr = null;
  const idat = [];
  while (at < buf.length) {
    const len = buf.readUInt32BE(at);
    const type = buf.toString('latin1', at + 4, at + 8);
    const data = buf.subarray(at + 8, at + 8 + len);
    if (type === 'IHDR') ihdr = { width: data.readUInt32BE(0), height: data.readUInt32BE(4), bitDepth: data[8], colourType: data[9], interlace: data[12] };
    else if (type === 'IDAT') idat.push(data);
    else if (type === 'IEND') break;
    at += 12 + len;
  }
  if (!ihdr) throw new Error('PNG without IHDR');
  const { width, height, bitDepth, colourType, interlace } = ihdr;
  if (bitDepth !== 8 || (colourType !== 2 && colourType !== 6) || interlace !== 0) throw new Error(`PNG form not handled here: depth ${bitDepth}, colour type ${colourType}, interlace ${interlace}`);
  const bpp = colourType === 6 ? 4 : 3;
  const raw = inflateSync(Buffer.concat(idat));
  const stride = width * bpp;
  const px = new Uint8Array(width * height * bpp);
  let prev = new Uint8Array(stride);
  for (let y = 0; y < height; y++) {
    const f = raw[y * (stride + 1)];
    const line = raw.subarray(y * (stride + 1) + 1, (y + 1) * (stride + 1));
    const out = px.subarray(y * stride, (y + 1) * stride);
    for (let i = 0; i < stride; i++) {
      const a = i >= bpp ? out[i - bpp] : 0, b = prev[i], c = i >= bpp ? prev[i - bpp] : 0;
      let v = line[i];
      if (f === 1) v += a;
      else if (f === 2) v += b;
      else if (f === 3) v += (a + b) >> 1;
      else if (f === 4) {
        const p = a + b - c, pa = Math.abs(p - a), pb = Math.abs(p - b), pc = Math.abs(p - c);
        v += pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
      } else if (f !== 0) throw new Error(`bad PNG filter ${f} on row ${y}`);
      out[i] = v & 255;
    }
    prev = out;
  }
  const rgba = new Uint8Array(width * height * 4);
  for (let i = 0; i < width * height; i++) {
    rgba[4 * i] = px[bpp * i];
    rgba[4 * i + 1] = px[bpp * i + 1];
    rgba[4 * i + 2] = px[bpp * i + 2];
    rgba[4 * i + 3] = bpp === 4 ? px[bpp * i + 3] : 255;
  }
  return { ...ihdr, rgba };
}

/** Inside a region (CSS px, scaled by `ratio`): share of pixels unlike `bg` (#rrggbb), distinct coarse colours, smallest alpha. */
function regionProbe(img, r, ratio, bg) {
  const [br, bgG, bb] = [1, 3, 5].map((k) => parseInt(bg.slice(k, k + 2), 16));
  const x0 = Math.round(r.x * ratio) + 2, x1 = Math.round((r.x + r.w) * ratio) - 2;
  const y0 = Math.round(r.y * ratio) + 2, y1 = Math.round((r.y + r.h) * ratio) - 2;
  let unlike = 0, n = 0, minAlpha = 255;
  const colours = new Set();
  for (let y = y0; y < y1; y++) {
    for (let x = x0; x < x1; x++) {
      const i = 4 * (y * img.width + x);
      const [R, G, B, A] = [img.rgba[i], img.rgba[i + 1], img.rgba[i + 2], img.rgba[i + 3]];
      n++;
      minAlpha = Math.min(minAlpha, A);
      if (Math.abs(R - br) + Math.abs(G - bgG) + Math.abs(B - bb) > 24) unlike++;
      colours.add(((R >> 4) << 8) | ((G >> 4) << 4) | (B >> 4));
    }
  }
  return { unlike: unlike / n, colours: colours.size, minAlpha };
}

/** Clicks the button and collects the three downloads: name → bytes. */
async function exportFiles(page) {
  const got = [];
  const done = new Promise((res, rej) => {
    const timer = setTimeout(() => rej(new Error(`only ${got.length} of 3 downloads arrived: ${got.map((d) => d.suggestedFilename()).join(', ')}`)), 30_000);
    page.on('download', (d) => {
      got.push(d);
      if (got.length === 3) {
        clearTimeout(timer);
        res();
      }
    });
  });
  const t0 = Date.now();
  await page.click('[data-testid=export-report]');
  await done;
  console.log(`[report] three downloads ${Date.now() - t0} ms after the click`);
  const files = {};
  for (const d of got) files[d.suggestedFilename()] = { bytes: readFileSync(await d.path()), path: await d.path() };
  // kept for a look (test-results/ holds the screenshots too)
  const png = got.find((d) => d.suggestedFilename().endsWith('.png'));
  if (png) await png.saveAs(join(root, 'test-results', `e2e-report-exported${process.env.TORUSGRAV_E2E_OUT ? `-${process.env.TORUSGRAV_E2E_OUT}` : ''}.png`));
  return files;
}

export const tests = {
  '"Export report" downloads a 2× PNG with non-blank plots and 3D view, the residuals CSV and a JSON summary equal to the engine\'s figures': async (page, baseUrl, { log, screenshot }) => {
    await openFresh(page, baseUrl);
    await waitStatus(page, 'done', 30_000);
    await waitViewComparison(page);
    // the follow-up convergence measurement: its plots go into the report too
    await page.waitForSelector('[data-testid=plot-convergence-mesh] svg', { timeout: 30_000 });
    await page.fill('[data-testid=verdict-limit]', '50 %');
    await page.selectOption('[data-testid=verdict-key]', 'p99');
    const files = await exportFiles(page);
    const names = Object.keys(files).sort();
    log(`downloads: ${names.join(', ')}`);
    const png = names.find((n) => /^torusgrav-report-[0-9TZ-]+\.png$/.test(n));
    const csv = names.find((n) => n.endsWith('-residuals.csv'));
    const json = names.find((n) => n.endsWith('-summary.json'));
    check(png && csv && json, `expected a .png, a -residuals.csv and a -summary.json, got ${names.join(', ')}`);
    check(png.replace(/\.png$/, '') === csv.replace(/-residuals\.csv$/, '') && png.replace(/\.png$/, '') === json.replace(/-summary\.json$/, ''), 'the three files do not share one name');

    // the JSON summary: schema, figures equal to the engine's on the CSV's A and B, and to the page's table
    const summary = JSON.parse(files[json].bytes.toString('utf8'));
    check(summary.schema === 'torusgrav.check/1', `schema ${summary.schema}`);
    check(summary.n === 4096 && summary.targets === 4096, `n ${summary.n}, targets ${summary.targets}`);
    check(/^[0-9a-f]{64}$/.test(summary.sha256) && /positions/.test(summary.sha256Of), `demo sha256 ${summary.sha256} (${summary.sha256Of})`);
    check(summary.reference.method === 'ewald' && summary.reference.tol === 1e-6 && summary.reference.alpha > 0 && summary.reference.kCut > 0, `reference ${JSON.stringify(summary.reference).slice(0, 200)}`);
    check(summary.compared.method === 'mesh' && summary.compared.mesh === 32, `compared ${JSON.stringify(summary.compared)}`);
    check(summary.version === JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')).version, `version ${summary.version}`);
    const fig = spawnSync(process.execPath, ['--import', 'tsx', join(root, 'tests/e2e/reportFigures.ts'), files[csv].path], { cwd: root, encoding: 'utf8' });
    check(fig.status === 0, `engine figures failed: ${fig.stderr}`);
    const eng = JSON.parse(fig.stdout);
    for (const k of ['p50', 'p90', 'p99', 'p999', 'max']) check(summary.relativeError[k] === eng[k], `${k}: summary ${summary.relativeError[k]} ≠ engine ${eng[k]}`);
    check(Math.abs(summary.relativeError.rms - eng.rms) <= 1e-15 * eng.rms, `rms: summary ${summary.relativeError.rms} ≠ engine ${eng.rms}`);
    check(summary.rmsErrorOverRmsAcceleration === eng.rmsRatio, `rms ratio ${summary.rmsErrorOverRmsAcceleration} ≠ ${eng.rmsRatio}`);
    check(summary.rmsError === eng.rmsError && summary.rmsReference === eng.rmsReference, 'rms error or rms |a_B| differ from the engine');
    check(JSON.stringify(summary.worst.map((w) => w.id)) === JSON.stringify(eng.worstIds), `worst ids ${summary.worst.map((w) => w.id)} ≠ ${eng.worstIds}`);
    check(eng.relMatches, 'rel_error column differs from the engine\'s relative errors');
    for (const [k, key] of [['p50', 'p50'], ['p90', 'p90'], ['p99', 'p99'], ['p999', 'p999'], ['max', 'max'], ['rmsRatio', 'rmsErrorOverRmsAcceleration']]) {
      const shown = await statsNumber(page, k);
      const v = key === 'rmsErrorOverRmsAcceleration' ? summary[key] : summary.relativeError[key];
      check(shown === v, `${k}: page table ${shown} ≠ summary ${v}`);
    }
    // the verdict asked for: p99 ≤ 50 %
    check(summary.requirements.length === 1 && summary.requirements[0].key === 'p99' && summary.requirements[0].limit === 0.5, `requirements ${JSON.stringify(summary.requirements)}`);
    check(summary.pass === summary.relativeError.p99 <= 0.5 && summary.verdict.startsWith('99th percentile') && summary.verdict.includes('50 %'), `verdict "${summary.verdict}", pass ${summary.pass}`);

    // the CSV: header and one row per target
    const lines = files[csv].bytes.toString('utf8').trim().split('\n');
    check(lines[0] === 'id,x,y,z,ax_A,ay_A,az_A,ax_B,ay_B,az_B,rel_error', `CSV header ${lines[0]}`);
    check(lines.length - 1 === 4096, `CSV rows ${lines.length - 1}`);

    // the PNG: signature, IHDR = 2 × the layout, a sensible size, regions not blank, opaque
    const bytes = files[png].bytes;
    check(PNG_SIGNATURE.every((b, i) => bytes[i] === b), `PNG signature ${Array.from(bytes.subarray(0, 8))}`);
    const img = pngDecode(bytes);
    const info = summary.image;
    check(info && info.pixelRatio === 2, `image info ${JSON.stringify(info)?.slice(0, 200)}`);
    check(img.width === 2 * info.width && img.height === 2 * info.height, `PNG ${img.width}×${img.height}, layout ${info.width}×${info.height} (2× expected)`);
    check(img.width === 2400 && img.height > 2 * 1200, `PNG ${img.width}×${img.height}`);
    check(bytes.length > 200_000 && bytes.length < 20_000_000, `PNG of ${bytes.length} bytes`);
    log(`PNG ${img.width}×${img.height}, ${(bytes.length / 1e6).toFixed(2)} MB`);
    const regions = info.regions;
    for (const key of ['plot-distribution', 'plot-vs-acc', 'plot-vs-neighbours', 'plot-convergence-mesh', 'plot-convergence-ewald']) {
      check(regions[key], `no ${key} in the image (regions: ${Object.keys(regions).join(', ')})`);
      const p = regionProbe(img, regions[key], 2, '#fbfbf7');
      log(`${key}: ${(100 * p.unlike).toFixed(1)} % drawn, ${p.colours} colours`);
      check(p.unlike > 0.02 && p.colours >= 6, `${key} looks blank: ${JSON.stringify(p)}`);
    }
    const v = regionProbe(img, regions.view, 2, '#17211f');
    log(`3D view: ${(100 * v.unlike).toFixed(1)} % lit, ${v.colours} colours`);
    check(v.unlike > 0.01 && v.colours > 20, `3D view in the image looks blank: ${JSON.stringify(v)}`);
    const whole = regionProbe(img, { x: 0, y: 0, w: info.width, h: info.height }, 2, '#000000');
    check(whole.minAlpha === 255, 'the image has transparent pixels');
    await screenshot('exported');
  },

  'a dropped file\'s report carries the SHA-256 of its bytes, its ids and its accelerations as A': async (page, baseUrl, { fixtures, log }) => {
    const name = 'small-with-acc.csv';
    const text = readFileSync(join(fixtures, name), 'utf8');
    await openFresh(page, baseUrl);
    await waitStatus(page, 'done', 30_000);
    await dropFile(page, name, text);
    await waitComparison(page, 'file (ax, ay, az)', 'Ewald tol 1e-6', 30_000);
    await waitViewComparison(page);
    await page.fill('[data-testid=verdict-limit]', '1e-3');
    await page.selectOption('[data-testid=verdict-key]', 'max');
    const files = await exportFiles(page);
    const json = Object.keys(files).find((n) => n.endsWith('-summary.json'));
    const csv = Object.keys(files).find((n) => n.endsWith('-residuals.csv'));
    const summary = JSON.parse(files[json].bytes.toString('utf8'));
    check(summary.file === name && summary.n === 2000, `file ${summary.file}, n ${summary.n}`);
    const sha = createHash('sha256').update(Buffer.from(text, 'utf8')).digest('hex');
    check(summary.sha256 === sha, `sha256 ${summary.sha256}, the file's is ${sha} (${summary.sha256Of})`);
    check(summary.compared.method === 'file' && summary.compared.accelerations === 'ax,ay,az', `compared ${JSON.stringify(summary.compared)}`);
    check(summary.box.lx === 100, `box ${JSON.stringify(summary.box)}`);
    // the file's accelerations are Ewald at tolerance 1e-3: every relative error below 1e-3 passes
    check(summary.requirements[0].key === 'max' && summary.requirements[0].limit === 1e-3, `requirements ${JSON.stringify(summary.requirements)}`);
    check(summary.pass === (summary.relativeError.max <= 1e-3), `pass ${summary.pass} with max ${summary.relativeError.max}`);
    log(`verdict: ${summary.verdict}`);
    const lines = files[csv].bytes.toString('utf8').trim().split('\n');
    check(lines.length - 1 === summary.targets, `CSV rows ${lines.length - 1}, targets ${summary.targets}`);
    // ids come from the file's id column (1000 + row)
    const ids = lines.slice(1).map((l) => Number(l.split(',')[0]));
    check(ids.every((id) => id >= 1000 && id < 3000), `ids not from the file: ${ids.slice(0, 5)}`);
    check(summary.worst.every((w) => w.id >= 1000), `worst ids ${summary.worst.map((w) => w.id)}`);
    const img = pngDecode(files[Object.keys(files).find((n) => n.endsWith('.png'))].bytes);
    check(img.width === 2 * summary.image.width && img.height === 2 * summary.image.height, 'PNG size is not 2× the layout');
  },

  'with an image-sum order compared, the report draws its convergence panels across the width and lists its parameters': async (page, baseUrl, { log }) => {
    await openFresh(page, baseUrl, 'targets=300');
    await waitStatus(page, 'done', 40_000);
    await page.selectOption('[data-testid=method-a]', 'sphere');
    await page.fill('input[name="a.sphere.shells"]', '8');
    await page.click('[data-testid=compute]');
    await waitComparison(page, 'sphere R 8', 'Ewald tol 1e-6', 60_000);
    await page.click('[data-testid=convergence-run]');
    await page.waitForSelector('[data-testid=plot-convergence-sphere] svg', { timeout: 60_000 });
    await waitViewComparison(page);
    const files = await exportFiles(page);
    const summary = JSON.parse(files[Object.keys(files).find((n) => n.endsWith('-summary.json'))].bytes.toString('utf8'));
    check(summary.compared.method === 'sphere' && Object.keys(summary.compared).length > 2, `compared ${JSON.stringify(summary.compared).slice(0, 300)}`);
    log(`compared: ${JSON.stringify(summary.compared).slice(0, 300)}`);
    const r = summary.image.regions['plot-order-sphere'];
    check(r && r.w === summary.image.width - 48, `order plot region ${JSON.stringify(r)}`);
    const img = pngDecode(files[Object.keys(files).find((n) => n.endsWith('.png'))].bytes);
    const p = regionProbe(img, r, 2, '#fbfbf7');
    log(`plot-order-sphere: ${(100 * p.unlike).toFixed(1)} % drawn, ${p.colours} colours`);
    check(p.unlike > 0.02 && p.colours >= 6, `order convergence plot looks blank: ${JSON.stringify(p)}`);
  },
};

export const timeouts = {
  'with an image-sum order compared, the report draws its convergence panels across the width and lists its parameters': 150_000,
};
