import { describe, expect, it } from 'vitest';
import { escapeHtml, escapeMarkdown, mermaidLabel } from '../../src/text/index.js';

describe('escapeMarkdown', () => {
  it('turns every markdown and HTML special character into a numeric character reference', () => {
    expect(escapeMarkdown('a|b')).toBe('a&#124;b');
    expect(escapeMarkdown('<script>')).toBe('&#60;script&#62;');
    expect(escapeMarkdown('`code`')).toBe('&#96;code&#96;');
    expect(escapeMarkdown('**x** _y_ ~z~')).toBe('&#42;&#42;x&#42;&#42; &#95;y&#95; &#126;z&#126;');
    expect(escapeMarkdown('[t](u)')).toBe('&#91;t&#93;(u)');
    expect(escapeMarkdown(']]>')).toBe('&#93;&#93;&#62;');
    expect(escapeMarkdown('a & b "c" \'d\'')).toBe('a &#38; b &#34;c&#34; &#39;d&#39;');
    expect(escapeMarkdown('\\')).toBe('&#92;');
    expect(escapeMarkdown('$x$ # h')).toBe('&#36;x&#36; &#35; h');
    expect(escapeMarkdown('https://x and www.example.org, time 10:30')).toBe(
      'https&#58;//x and www&#46;example.org, time 10:30',
    );
  });

  it('keeps everything on one line and drops control characters', () => {
    expect(escapeMarkdown('one\ntwo\r\nthree\rfour\tfive')).toBe('one two three four five');
    expect(escapeMarkdown('a\u0000b\u0007c\u2028d')).toBe('abcd');
  });

  it('defuses mentions with a zero-width space', () => {
    expect(escapeMarkdown('ping @octocat')).toBe('ping @&#8203;octocat');
    expect(escapeMarkdown('a @ b')).toBe('a @ b');
  });

  it('leaves plain names, digits, dashes, dots and non-ASCII letters alone', () => {
    expect(escapeMarkdown('tracking-api p95 v1.2 Zürich 東京')).toBe('tracking-api p95 v1.2 Zürich 東京');
  });
});

describe('escapeHtml', () => {
  it('escapes the five HTML specials and keeps the rest', () => {
    expect(escapeHtml(`<a href="x" title='y'>&</a>`)).toBe(
      '&lt;a href=&quot;x&quot; title=&#39;y&#39;&gt;&amp;&lt;/a&gt;',
    );
    expect(escapeHtml(']]> | `x`')).toBe(']]&gt; | `x`');
    expect(escapeHtml('a\u0000b')).toBe('ab');
  });
});

describe('mermaidLabel', () => {
  it('keeps letters, digits and harmless punctuation, never empty, capped in length', () => {
    expect(mermaidLabel('p95 "latency"; %%{init}%% <b>')).toBe('p95 latency init b');
    expect(mermaidLabel('"]];')).toBe('series');
    expect(mermaidLabel('x'.repeat(100))).toHaveLength(60);
    expect(mermaidLabel('disk (GB), /var')).toBe('disk (GB), /var');
  });
});
