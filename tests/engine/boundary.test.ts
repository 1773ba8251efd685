/**
 * engine/ is pure numerics and parsers (RULES.md, STYLE.md): it must run in a web worker and in Node, so it
 * may not import the app, UI libraries or worker plumbing, nor touch the DOM. This test reads every source
 * file under engine/ and fails on any such import or on a use of `document` / `window`.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const ENGINE = join(ROOT, 'engine');
const SOURCE = /\.(ts|tsx|js|mjs|cjs|jsx)$/;

function sourceFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name);
    return statSync(path).isDirectory() ? sourceFiles(path) : SOURCE.test(name) ? [path] : [];
  });
}

/** Source with comments and the contents of string literals blanked (imports keep their specifier). */
function codeOnly(src: string): string {
  return src
    .replace(/\/\*[\s\S]*?\*\//g, ' ')
    .replace(/(^|[^:\\])\/\/.*$/gm, '$1')
    .replace(/`(?:\\[\s\S]|[^`\\])*`/g, '``');
}

/** Every module specifier the file loads: import/export … from, bare import, dynamic import(), require(). */
function specifiers(code: string): string[] {
  const out: string[] = [];
  const patterns = [
    /\b(?:import|export)\s[^'"`;]*?\sfrom\s*['"]([^'"]+)['"]/g,
    /\bimport\s*['"]([^'"]+)['"]/g,
    /\bimport\s*\(\s*['"]([^'"]+)['"]\s*\)/g,
    /\brequire\s*\(\s*['"]([^'"]+)['"]\s*\)/g,
  ];
  for (const re of patterns) for (const m of code.matchAll(re)) out.push(m[1]);
  return out;
}

const FORBIDDEN_PACKAGE = /^(react|react-dom|three|zustand|comlink|d3(-[\w-]+)?)(\/|$)/;

/** Why a specifier is not allowed in engine/ (null when it is). */
function forbidden(spec: string, file: string): string | null {
  if (FORBIDDEN_PACKAGE.test(spec)) return `imports ${spec}`;
  if (spec.startsWith('.')) {
    const target = relative(ROOT, join(file, '..', spec)).split('\\').join('/');
    if (target === 'app' || target.startsWith('app/')) return `imports the app (${spec})`;
  }
  if (/^(\/|~\/|@\/)?app\//.test(spec)) return `imports the app (${spec})`;
  return null;
}

describe('engine/ boundary', () => {
  const files = sourceFiles(ENGINE);

  it('finds the engine sources to check', () => {
    expect(files.length).toBeGreaterThan(20);
    expect(files.some((f) => f.endsWith(join('ewald', 'ewald.ts')))).toBe(true);
  });

  it('no file under engine/ imports app/, react, react-dom, three, d3*, zustand or comlink', () => {
    const offences: string[] = [];
    for (const file of files) {
      const code = codeOnly(readFileSync(file, 'utf8'));
      for (const spec of specifiers(code)) {
        const why = forbidden(spec, file);
        if (why) offences.push(`${relative(ROOT, file)}: ${why}`);
      }
    }
    expect(offences).toEqual([]);
  });

  it('no file under engine/ uses document or window', () => {
    const offences: string[] = [];
    for (const file of files) {
      const code = codeOnly(readFileSync(file, 'utf8')).replace(/'(?:\\.|[^'\\\n])*'|"(?:\\.|[^"\\\n])*"/g, "''");
      code.split('\n').forEach((line, i) => {
        if (/\b(document|window)\b/.test(line)) offences.push(`${relative(ROOT, file)}:${i + 1}: ${line.trim()}`);
      });
    }
    expect(offences).toEqual([]);
  });

  it('the checks catch what they look for (self-test on synthetic sources)', () => {
    const file = join(ENGINE, 'ewald', 'x.ts');
    const bad = [
      "import { useState } from 'react';",
      "import * as d3 from 'd3';",
      "import { scaleLinear } from 'd3-scale';",
      "export { store } from '../../app/web/store';",
      "const m = await import('three');",
      "import 'zustand';",
      "const c = require('comlink');",
    ];
    for (const src of bad) expect(specifiers(codeOnly(src)).map((s) => forbidden(s, file)).filter(Boolean)).toHaveLength(1);
    const good = ["import { erf } from '../special/erf';", "// import React from 'react'", "const s = 'window';"];
    for (const src of good) expect(specifiers(codeOnly(src)).map((s) => forbidden(s, file)).filter(Boolean)).toHaveLength(0);
    expect(/\b(document|window)\b/.test(codeOnly('const w = window.innerWidth;'))).toBe(true);
    expect(/\b(document|window)\b/.test(codeOnly('// a sliding window'))).toBe(false);
  });
});
