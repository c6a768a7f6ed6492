/**
 * The longest functions in src/ (lines from the declaration to its closing brace, nested functions counted in their
 * parent too), longest first: `npx tsx bench/function-lengths.ts [count]`. Printed by `npm run bench` too.
 * (@babel/parser comes with the dev tools already installed; TypeScript 7 has no JavaScript API.)
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { parse } from '@babel/parser';

interface Node {
  readonly type: string;
  readonly [key: string]: unknown;
}

export interface FunctionLength {
  readonly file: string;
  readonly name: string;
  readonly line: number;
  readonly lines: number;
}

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    return statSync(p).isDirectory() ? files(p) : p.endsWith('.ts') ? [p] : [];
  });
}

export function functionLengths(root = 'src'): FunctionLength[] {
  const out: FunctionLength[] = [];
  for (const file of files(root)) {
    const text = readFileSync(file, 'utf8');
    const ast = parse(text, { sourceType: 'module', plugins: ['typescript'] });
    const nameOf = (x: unknown): string | undefined => (x as { name?: string } | undefined)?.name;
    const visit = (node: Node | undefined, parent: Node | undefined): void => {
      if (!node || typeof node.type !== 'string') return;
      const body = node.body as Node | undefined;
      if (/Function|Method/.test(node.type) && body?.type === 'BlockStatement') {
        const name =
          nameOf(node.id) ??
          nameOf(node.key) ??
          (parent?.type === 'VariableDeclarator' || parent?.type === 'ObjectProperty'
            ? (nameOf(parent.id) ?? nameOf(parent.key))
            : undefined) ??
          '(anonymous)';
        const loc = node.loc as { start: { line: number }; end: { line: number } };
        out.push({ file: relative('.', file), name, line: loc.start.line, lines: loc.end.line - loc.start.line + 1 });
      }
      for (const [k, v] of Object.entries(node)) {
        if (k === 'loc' || k === 'leadingComments' || k === 'trailingComments') continue;
        if (Array.isArray(v)) for (const c of v) visit(c as Node, node);
        else if (v && typeof v === 'object') visit(v as Node, node);
      }
    };
    visit(ast.program as unknown as Node, undefined);
  }
  return out.sort((a, b) => b.lines - a.lines);
}

if (import.meta.url === `file://${process.argv[1]}`) {
  for (const f of functionLengths().slice(0, Number(process.argv[2] ?? 15)))
    console.log(`${String(f.lines).padStart(4)}  ${f.name}  ${f.file}:${f.line}`);
}
