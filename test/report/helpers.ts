// Small readers of rendered reports shared by the report tests.

/** The lines outside ``` fences. */
export function prose(markdown: string): string[] {
  let inFence = false;
  return markdown.split('\n').filter((l) => {
    if (l.startsWith('```')) {
      inFence = !inFence;
      return false;
    }
    return !inFence;
  });
}

/** The source of every ```mermaid block. */
export function mermaidBlocks(markdown: string): string[] {
  return [...markdown.matchAll(/```mermaid\n([\s\S]*?)\n```/g)].map((m) => m[1]!);
}
