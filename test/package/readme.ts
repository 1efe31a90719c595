// README.md's fenced code blocks, each with the heading it sits under and its first line number.
import { readFileSync } from 'node:fs';

export interface CodeBlock {
  lang: string;
  code: string;
  /** The nearest heading above the block, without its #s. */
  heading: string;
  /** 1-based line of the block's first code line in README.md. */
  line: number;
}

export const README = new URL('../../README.md', import.meta.url);

export function codeBlocks(text = readFileSync(README, 'utf8')): CodeBlock[] {
  const blocks: CodeBlock[] = [];
  const lines = text.split('\n');
  let heading = '';
  for (let i = 0; i < lines.length; i++) {
    const h = /^#{1,6}\s+(.*)$/.exec(lines[i]!);
    if (h) heading = h[1]!.trim();
    const open = /^(\s*)(`{3,}|~{3,})\s*([\w-]*)/.exec(lines[i]!);
    if (!open) continue;
    const fence = open[2]!;
    const body: string[] = [];
    let j = i + 1;
    while (j < lines.length && !lines[j]!.trim().startsWith(fence)) body.push(lines[j++]!);
    if (j === lines.length) throw new Error(`README.md:${i + 1}: a code block is never closed`);
    blocks.push({ lang: open[3]!, code: body.join('\n') + '\n', heading, line: i + 2 });
    i = j;
  }
  return blocks;
}
