import { describe, expect, it } from 'vitest';
import { HELP, parseCli } from '../../src/cli/args.js';
import { parseFailOn } from '../../src/verdict.js';
import { LeadlineError } from '../../src/errors.js';

describe('command-line arguments', () => {
  it('reads every flag of run into the settings', () => {
    const s = parseCli(
      [
        'run',
        '--config',
        'l.yml',
        '--cwd',
        'd',
        '--json',
        'r.json',
        '--markdown',
        'r.md',
        '--html',
        'r.html',
        '--fail-on',
        'never',
        '--print',
        'json',
        '--quiet',
      ],
      {},
      '/w',
      true,
    );
    expect(s).toMatchObject({
      command: 'run',
      config: 'l.yml',
      cwd: 'd',
      json: 'r.json',
      markdown: 'r.md',
      html: 'r.html',
      failOn: 'never',
      print: 'json',
      progress: false,
    });
  });

  it('defaults to the conventional config path, both gates and colour only on a terminal', () => {
    const tty = parseCli(['run'], {}, '/w', true);
    expect(tty).toMatchObject({
      config: '.github/leadline.yml',
      cwd: '/w',
      failOn: 'both',
      print: 'summary',
      color: true,
    });
    expect(parseCli(['run'], {}, '/w', false).color).toBe(false);
  });

  it('respects NO_COLOR, and --color / --no-color override it', () => {
    expect(parseCli(['run'], { NO_COLOR: '1' }, '/w', true).color).toBe(false);
    expect(parseCli(['run', '--color'], { NO_COLOR: '1' }, '/w', false).color).toBe(true);
    expect(parseCli(['run', '--no-color'], {}, '/w', true).color).toBe(false);
  });

  it('reads --fail-on lists in any order', () => {
    expect(parseFailOn('alarm,limit')).toBe('both');
    expect(parseFailOn('limit, alarm')).toBe('both');
    expect(parseFailOn('limit')).toBe('limit');
    expect(parseFailOn('alarm')).toBe('alarm');
    expect(parseFailOn('never')).toBe('never');
  });

  it('rejects a bad --fail-on value, quoting it', () => {
    expect(() => parseFailOn('alarms')).toThrow(/"alarms" is not valid/);
    expect(() => parseFailOn('never,alarm')).toThrow(/cannot be combined/);
  });

  it('rejects unknown flags, commands and stray arguments as usage errors', () => {
    const usage = (argv: string[]) => {
      try {
        parseCli(argv, {}, '/w', false);
      } catch (e) {
        expect(e).toBeInstanceOf(LeadlineError);
        return (e as LeadlineError).kind + ': ' + (e as Error).message;
      }
      return 'no error';
    };
    expect(usage(['run', '--colour'])).toMatch(/^usage: .*--colour/);
    expect(usage(['check'])).toMatch(/^usage: Unknown command "check"/);
    expect(usage(['run', 'extra'])).toMatch(/^usage: Unexpected argument "extra"/);
    expect(usage([])).toMatch(/^usage: No command given/);
    expect(usage(['run', '--print', 'html'])).toMatch(/"html" is not valid/);
  });

  it('documents every flag it accepts in --help', () => {
    for (const flag of [
      '--config',
      '--cwd',
      '--json',
      '--markdown',
      '--html',
      '--template',
      '--fail-on',
      '--print',
      '--color',
      '--no-color',
      '--quiet',
      '--help',
      '--version',
    ])
      expect(HELP).toContain(flag);
    expect(HELP).toMatch(/not guarantees/);
  });
});
