import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { epochDay, formatIsoDate, isoWeekday } from '../../src/calendar/days.js';
import { runCli, scratchDir, writeFiles } from '../cli/run-cli.js';

/**
 * The daily run end to end on a small invented feed: the acceptance checks of issue 12
 * (two runs of one day raise nothing new; a fixed fault is resolved; an expired acknowledgement
 * shows its ticket again; feed text stays inert in every output).
 */
const S2_ZERO_DAY = '2026-11-10';

function navCsv(options: { zero: boolean; hostileId?: string }): string {
  const lines = ['series_id,date,nav'];
  const ids = ['S1', 'S2', 'S3', ...(options.hostileId ? [options.hostileId] : [])];
  ids.forEach((id, k) => {
    let nav = 100 + 10 * k;
    for (let day = epochDay(2026, 9, 1); day <= epochDay(2026, 11, 27); day++) {
      if (isoWeekday(day) > 5) continue;
      nav *= 1 + 0.002 * Math.sin(day * (k + 1));
      const date = formatIsoDate(day);
      const value = options.zero && id === 'S2' && date === S2_ZERO_DAY ? 0 : nav;
      lines.push(`${id.includes(',') || id.includes('"') ? `"${id.replace(/"/g, '""')}"` : id},${date},${value.toFixed(4)}`);
    }
  });
  return lines.join('\n') + '\n';
}

const config = ['feed: small', 'store: store', 'files:', '  nav: nav.csv', 'acknowledgements: acks.yaml', 'output:', '  dir: out', '  formats: [json]', 'fail_on: none', ''].join('\n');

interface TicketLine {
  key: string;
  state: string;
  silenced: boolean;
  acknowledgement: { status: string } | null;
}

function ticketsOf(dir: string): TicketLine[] {
  return readFileSync(join(dir, 'out', 'tickets.jsonl'), 'utf8').trim().split('\n').filter(Boolean).map((line) => JSON.parse(line));
}

describe('the daily run carries tickets across days', () => {
  it('a second run of the same day raises no new ticket; a fixed fault is resolved; an expired acknowledgement brings its ticket back', async () => {
    const dir = scratchDir();
    writeFiles(dir, { 'nav.csv': navCsv({ zero: true }), 'run.yaml': config });
    const first = await runCli('run', join(dir, 'run.yaml'), '--as-of', '2026-11-27', '--format', 'json', '--quiet');
    expect(first.status).toBe(0);
    const zeroKey = 'non_positive_value|S2';
    expect(first.stderr).toBe(''); // --quiet
    expect(ticketsOf(dir).find((t) => t.key === zeroKey)?.state).toBe('new');

    const second = await runCli('run', join(dir, 'run.yaml'), '--as-of', '2026-11-27', '--format', 'json');
    expect(ticketsOf(dir).filter((t) => t.state === 'new')).toEqual([]);
    expect(ticketsOf(dir).find((t) => t.key === zeroKey)?.state).toBe('open');
    expect(JSON.parse(second.stdout).tickets.counts.new).toBe(0);
    // The same files again: the stored snapshot is kept, and the run says so.
    expect(second.stderr).toContain('the snapshot of 2026-11-27 stored at');
    expect(second.stderr).toContain('it was kept');
    expect(second.stderr).toContain('the acknowledgement file'); // named in the configuration, not there yet

    writeFiles(dir, { 'nav.csv': navCsv({ zero: false }) });
    await runCli('run', join(dir, 'run.yaml'), '--as-of', '2026-11-30', '--format', 'json', '--quiet');
    const resolved = ticketsOf(dir).find((t) => t.key === zeroKey);
    expect(resolved?.state).toBe('resolved');

    // The fault comes back, acknowledged until 2026-12-01: silenced on 2026-12-01, shown again on 2026-12-02.
    writeFiles(dir, { 'nav.csv': navCsv({ zero: true }), 'acks.yaml': `- key: "${zeroKey}"\n  reason: provider resending the history\n  who: ops\n  expires: 2026-12-01\n` });
    await runCli('run', join(dir, 'run.yaml'), '--as-of', '2026-12-01', '--format', 'json', '--quiet');
    const silenced = ticketsOf(dir).find((t) => t.key === zeroKey)!;
    expect(silenced.state).toBe('reopened');
    expect(silenced.silenced).toBe(true);
    await runCli('run', join(dir, 'run.yaml'), '--as-of', '2026-12-02', '--format', 'json', '--quiet');
    const back = ticketsOf(dir).find((t) => t.key === zeroKey)!;
    expect(back.silenced).toBe(false);
    expect(back.acknowledgement?.status).toBe('expired');

    const ledger = JSON.parse(readFileSync(join(dir, 'store', 'small', 'tickets', 'ledger.json'), 'utf8'));
    expect(ledger.runs.map((r: { as_of: string }) => r.as_of)).toEqual(['2026-11-27', '2026-11-30', '2026-12-01', '2026-12-02']);
    for (const name of ['report.html', 'report.md', 'report.csv', 'report.json', 'tickets.csv', 'tickets.jsonl']) expect(existsSync(join(dir, 'out', name)), name).toBe(true);
  });

  it('a pinned previous file while the store holds an earlier snapshot says which it used', async () => {
    const dir = scratchDir();
    writeFiles(dir, { 'nav.csv': navCsv({ zero: false }), 'run.yaml': config });
    await runCli('run', join(dir, 'run.yaml'), '--as-of', '2026-11-27', '--format', 'json', '--quiet');
    writeFiles(dir, { 'prev.csv': navCsv({ zero: false }), 'pinned.yaml': config.replace('fail_on: none', 'fail_on: none\nprevious: prev.csv') });
    const pinned = await runCli('run', join(dir, 'pinned.yaml'), '--as-of', '2026-11-30', '--format', 'json');
    expect(pinned.stderr).toContain('pins previous:');
    expect(pinned.stderr).toContain('the store also holds the snapshot of 2026-11-27; the pinned file was used');
  });
});

describe('a large run', () => {
  it('writes no html or markdown table longer than 2000 rows: json and csv carry it, the report links them', async () => {
    const dir = scratchDir();
    const bad = Array.from({ length: 2100 }, (_, k) => `S1,not-a-date-${k},1`).join('\n');
    writeFiles(dir, { 'nav.csv': navCsv({ zero: false }) + bad + '\n', 'run.yaml': config.replace('[json]', '[json, html, markdown, csv]') });
    const run = await runCli('run', join(dir, 'run.yaml'), '--as-of', '2026-11-27', '--format', 'json');
    expect(JSON.parse(run.stdout).summary.by_check.unparseable_row).toBe(2100);
    expect(run.stderr).toContain('check has more than 2000 rows: written as json and csv only');
    for (const name of ['check.json', 'check.csv', 'report.html', 'report.md']) expect(existsSync(join(dir, 'out', name)), name).toBe(true);
    for (const name of ['check.html', 'check.md']) expect(existsSync(join(dir, 'out', name)), name).toBe(false);
    // 2100 unreadable rows are one ticket, not 2100.
    expect(ticketsOf(dir).filter((t) => t.key.startsWith('unparseable_row'))).toHaveLength(1);
  });
});

describe('feed text stays inert in every output', () => {
  it('a series id carrying a spreadsheet formula or a script tag is neutralised in CSV, Markdown and HTML', async () => {
    const dir = scratchDir();
    const formula = '=HYPERLINK("http://example.invalid","x")';
    const script = '<script>alert(1)</script>';
    // The hostile ids are unknown to the master, so each raises an unknown_series finding and ticket.
    writeFiles(dir, {
      'nav.csv': navCsv({ zero: true, hostileId: formula }) + navCsv({ zero: false, hostileId: script }).split('\n').filter((l) => l.startsWith('<script>')).join('\n') + '\n',
      'master.csv': ['series_id,benchmark_id,name', 'S1,,One', 'S2,,Two', 'S3,,Three', ''].join('\n'),
      'run.yaml': config.replace('  nav: nav.csv', '  nav: nav.csv\n  master: master.csv').replace('[json]', '[json, csv, markdown, html]'),
    });
    const run = await runCli('run', join(dir, 'run.yaml'), '--as-of', '2026-11-27', '--format', 'json', '--quiet');
    expect(run.status, run.stderr).toBe(0);
    const answer = JSON.parse(run.stdout);
    expect(answer.findings.some((f: { series_id: string }) => f.series_id === formula)).toBe(true);
    expect(answer.findings.some((f: { series_id: string }) => f.series_id === script)).toBe(true);
    for (const name of ['tickets.csv', 'report.csv', 'check.csv']) {
      const text = readFileSync(join(dir, 'out', name), 'utf8');
      // OWASP "CSV Injection": a cell starting with = + - @ tab or CR is prefixed with an apostrophe.
      for (const cell of text.split(/,(?=(?:[^"]*"[^"]*")*[^"]*$)|\n/)) expect(cell, `${name}: ${cell}`).not.toMatch(/^"?[=+@\t\r]/);
      expect(text, name).toContain(`'=HYPERLINK`);
    }
    for (const name of ['report.md', 'check.md']) {
      const text = readFileSync(join(dir, 'out', name), 'utf8');
      expect(text, name).not.toContain('<script');
      expect(text, name).toContain('&lt;script&gt;');
    }
    for (const name of ['report.html', 'check.html']) {
      const text = readFileSync(join(dir, 'out', name), 'utf8');
      expect(text, name).not.toMatch(/<script/i);
      expect(text, name).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
    }
  });
});
