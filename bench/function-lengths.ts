/**
 * (@babel/parser comes with the dev tools already installed; TypeScript 7 has no JavaScript API.)
 * The longest functions in src/ (lines from the declaration to its closing brace, nested functions counted in their
 * parent too), longest first: `node scripts/function-lengths.mjs [count]`. Used by `npm run bench` and by readers.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { parse } from '@babel/parser';

function files(dir) {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    return statSync(p).isDirectory() ? files(p) : p.endsWith('.ts') ? [p] : [];
  });
}

export function functionLengths(root = 'src') {
  const out = [];
  for (const file of files(root)) {
    const text = readFileSync(file, 'utf8');
    const ast = parse(text, { sourceType: 'module', plugins: ['typescript'] });
    const visit = (node, parent) => {
      if (!node || typeof node.type !== 'string') return;
      if (/Function|Method/.test(node.type) && node.body?.type === 'BlockStatement') {
        const name =
          node.id?.name ??
          node.key?.name ??
          (parent?.type === 'VariableDeclarator' || parent?.type === 'ObjectProperty'
            ? (parent.id?.name ?? parent.key?.name)
            : undefined) ??
          '(anonymous)';
        const line = node.loc.start.line;
        out.push({ file: relative('.', file), name, line, lines: node.loc.end.line - line + 1 });
      }
      for (const [k, v] of Object.entries(node)) {
        if (k === 'loc' || k === 'leadingComments' || k === 'trailingComments') continue;
        if (Array.isArray(v)) for (const c of v) visit(c, node);
        else if (v && typeof v === 'object') visit(v, node);
      }
    };
    visit(ast.program, undefined);
  }
  return out.sort((a, b) => b.lines - a.lines);
}

if (import.meta.url === `file://${process.argv[1]}`) {
  for (const f of functionLengths().slice(0, Number(process.argv[2] ?? 15)))
    console.log(`${String(f.lines).padStart(4)}  ${f.name}  ${f.file}:${f.line}`);
}
