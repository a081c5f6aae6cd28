import * as assert from 'node:assert/strict';
import { mkdtempSync, readFileSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Papa from 'papaparse';
import { analyzeExport, type AnalysisResult } from '../../../extension/node/analyze';
import { describeLibraryLines, runClassify, toClassifyJson, writeFindingInto, parseRange, UsageError } from '../../../extension/cli/classify';
import { renderFindingMarkdown } from '../../../extension/core/report';
import { runLibrary } from '../../../extension/cli/library';

const ROOT = join(__dirname, '..', '..', '..');
const MODEL_DIR = join(ROOT, 'media', 'model');
const NAB = join(ROOT, 'test', 'fixtures', 'nab-cloud');
// Real open data: Numenta Anomaly Benchmark cloud series (MIT licence, LICENSE.txt beside it).
const FILE = 'realAWSCloudwatch__ec2_cpu_utilization_24ae8d.csv';

function labelledWindows(file: string): { startMs: number; endMs: number }[] {
  const rows = Papa.parse<Record<string, string>>(readFileSync(join(NAB, 'labels.csv'), 'utf8'), { header: true, skipEmptyLines: true }).data;
  return rows.filter((r) => r.file === `series/${file}`).map((r) => ({ startMs: Date.parse(r.fault_start), endMs: Date.parse(r.fault_end) }));
}

describe('analyzeExport end to end (real bundled model, real labelled cloud series)', function () {
  this.timeout(120_000);
  let result: AnalysisResult;

  before(async () => {
    result = await analyzeExport(join(NAB, 'series', FILE), { modelDir: MODEL_DIR, nowMs: Date.UTC(2026, 0, 1) });
  });

  it('suggests an incident window that overlaps a window labelled by the benchmark\'s people (NAB combined_windows)', () => {
    const { incident } = result.finding;
    const hits = labelledWindows(FILE).filter((w) => incident.startMs <= w.endMs && incident.endMs >= w.startMs);
    assert.ok(hits.length >= 1, `suggested ${new Date(incident.startMs).toISOString()}..${new Date(incident.endMs).toISOString()} overlaps no labelled window`);
  });

  it('gives calibrated probabilities that sum to 1 and a runner-up below the winner', () => {
    const p = Object.values(result.finding.verdict.probabilities);
    assert.ok(Math.abs(p.reduce((a, b) => a + b, 0) - 1) < 1e-6);
    assert.ok(result.finding.verdict.runnerUp.probability <= result.finding.verdict.probability);
  });

  it('attributes the whole value to the only metric (Shapley efficiency, Shapley 1953)', () => {
    assert.equal(result.frame.series.length, 1);
    assert.equal(result.finding.metrics.length, 1);
    assert.ok(Number.isFinite(result.finding.metrics[0].shapley));
    assert.equal(result.finding.metrics[0].shapleyCi95, 0);
  });

  it('reads the export timestamps as the file states them (RFC 3339 UTC in, RFC 3339 UTC out)', () => {
    const json = toClassifyJson(result.finding) as { window: { start: string; end: string }; verdict: { class: string; probability: number; abstain: boolean }; metrics: { id: string; family: string; shapley: number }[] };
    assert.match(json.window.start, /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z$/);
    assert.equal(json.window.start.slice(0, 4), '2014');
    assert.equal(typeof json.verdict.abstain, 'boolean');
    assert.equal(json.metrics[0].family, 'cpu');
  });

  it('has a timeline over the whole export with one probability row per point', () => {
    const { timeline } = result;
    assert.ok(timeline.timesMs.length > 100);
    assert.equal(timeline.probabilities.length, timeline.timesMs.length * timeline.classNames.length);
  });

  it('writes the block into a postmortem, keeps the rest byte-identical and replaces it on a re-run', () => {
    const dir = mkdtempSync(join(tmpdir(), 'mt-pm-'));
    try {
      const path = join(dir, 'postmortem.md');
      const draft = '# Incident 42\n\n## Timeline (UTC)\n- 22:05 alert fired\n\n## Supporting information\n';
      writeFileSync(path, draft);
      const block = renderFindingMarkdown(result.finding);
      writeFindingInto(path, block);
      writeFindingInto(path, block);
      const out = readFileSync(path, 'utf8');
      assert.ok(out.startsWith(draft));
      assert.equal(out.split('<!-- metric-triage:finding ').length - 1, 1);
      assert.match(out, /Decision aid, not a root cause/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('refuses to write the finding into a directory, naming it, and writes a CRLF postmortem in CRLF', () => {
    const dir = mkdtempSync(join(tmpdir(), 'mt-pm-'));
    try {
      const block = renderFindingMarkdown(result.finding);
      assert.throws(() => writeFindingInto(dir, block), (e: Error) => e.message === `${dir}: expected a markdown file to write the finding into, got a directory`);
      const path = join(dir, 'windows.md');
      const draft = '# Incident 43\r\n\r\n## Supporting information\r\n';
      writeFileSync(path, draft);
      writeFindingInto(path, block);
      const out = readFileSync(path, 'utf8');
      assert.ok(out.startsWith(draft));
      assert.equal(/(^|[^\r])\n/.test(out), false);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('names the file when the export holds no numeric series', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mt-bad-'));
    try {
      const path = join(dir, 'empty.csv');
      writeFileSync(path, 'time,cpu\n');
      await assert.rejects(analyzeExport(path, { modelDir: MODEL_DIR }), (e: Error) => e.message.includes('empty.csv'));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('says which rows it skipped, by file and line, when an export cannot be used', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mt-bad-'));
    try {
      const path = join(dir, 'ragged.csv');
      // RFC 4180 §2.4: each line should contain the same number of fields; line 3 has one too many.
      writeFileSync(path, 'time,cpu\n2026-01-01T00:00:00Z,1\n2026-01-01T00:01:00Z,2,3\n2026-01-01T00:02:00Z,3\n');
      await assert.rejects(analyzeExport(path, { modelDir: MODEL_DIR }), (e: Error) => /got 2 steps/.test(e.message) && e.message.includes('ragged.csv:3: expected 2 fields, got 3; row skipped'));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('puts the rows it skipped first among the data caveats of a finding, in the markdown too', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mt-ragged-'));
    try {
      const lines = readFileSync(join(NAB, 'series', FILE), 'utf8').split('\n');
      // Line 101 of the copy gets an extra field (RFC 4180 §2.4), line 201 a timestamp that is no timestamp.
      lines[100] = `${lines[100]},9`;
      lines[200] = `yesterday,${lines[200].split(',')[1]}`;
      const path = join(dir, 'cloud.csv');
      writeFileSync(path, lines.join('\n'));
      const analysed = await analyzeExport(path, { modelDir: MODEL_DIR, nowMs: Date.UTC(2026, 0, 1) });
      const [first] = analysed.finding.caveats;
      assert.match(first, /^The export reader reported 2 errors and 0 warnings/);
      assert.ok(first.includes(`${path}:101: expected 2 fields, got 3; row skipped`), first);
      assert.ok(first.includes(`${path}:201: expected a timestamp`), first);
      const markdown = renderFindingMarkdown(analysed.finding);
      assert.ok(markdown.includes(':101: expected 2 fields, got 3; row skipped'), markdown);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('lists a labelled past incident of the same export as the nearest one when a library is given', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mt-lib-'));
    try {
      const libraryPath = join(dir, 'incident-library.json');
      const { incident, baseline } = result.finding;
      const span = (s: { startMs: number; endMs: number }): string => `${new Date(s.startMs).toISOString()}/${new Date(s.endMs).toISOString()}`;
      const code = await runLibrary(['add', join(NAB, 'series', FILE), '--label', 'cpu-runaway', '--window', span(incident), '--baseline', span(baseline), '--library', libraryPath, '--model', MODEL_DIR]);
      assert.equal(code, 0);
      const withLibrary = await analyzeExport(join(NAB, 'series', FILE), { modelDir: MODEL_DIR, libraryPath, incident, baseline });
      assert.equal(withLibrary.finding.nearestIncidents?.[0]?.label, 'cpu-runaway');
      assert.ok((withLibrary.finding.nearestIncidents?.[0]?.similarity ?? 0) > 0.9);
      assert.match(renderFindingMarkdown(withLibrary.finding), /Similar past incidents/);
      // The headless output carries the library's say too: JSON fields and text lines.
      const json = toClassifyJson(withLibrary.finding) as { nearestIncidents?: { label: string }[]; libraryMatch?: { label: string; movedAlike?: { id: string }[] } };
      assert.equal(json.nearestIncidents?.[0]?.label, 'cpu-runaway');
      const lines = describeLibraryLines(withLibrary.finding);
      assert.match(lines.join('\n'), /nearest past incidents: cpu-runaway \(similarity (0\.9\d|1\.00)\)/);
      if (withLibrary.finding.verdict.libraryMatch) {
        assert.equal(json.libraryMatch?.label, 'cpu-runaway');
        assert.match(lines[0], /^ {2}library: matches your past incident cpu-runaway \(1 example\)/);
      }
      assert.deepEqual(describeLibraryLines(result.finding), [], 'no library, no lines');
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('refuses an explicit --library file that does not exist, naming it, rather than matching against nothing', async () => {
    const missing = join(tmpdir(), `mt-no-library-${process.pid}`, 'incident-library.json');
    const written: string[] = [];
    const original = process.stderr.write.bind(process.stderr);
    process.stderr.write = ((chunk: string | Uint8Array): boolean => { written.push(String(chunk)); return true; }) as typeof process.stderr.write;
    let code: number;
    try {
      code = await runClassify([join(NAB, 'series', FILE), '--library', missing, '--model', MODEL_DIR]);
    } finally {
      process.stderr.write = original;
    }
    assert.equal(code, 1);
    assert.match(written.join(''), new RegExp(`--library ${missing.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&')}: expected an incident library file, found none`));
  });

  it('classifies an incident window longer than the model\'s 512 samples (NAB grok_asg_anomaly, labelled windows)', async () => {
    const file = 'realAWSCloudwatch__grok_asg_anomaly.csv';
    const labels = labelledWindows(file);
    const long = await analyzeExport(join(NAB, 'series', file), { modelDir: MODEL_DIR, incident: { startMs: labels[0].startMs, endMs: labels[labels.length - 1].endMs } });
    assert.ok(long.finding.incident.endIndex - long.finding.incident.startIndex + 1 > 512);
    assert.ok(Number.isFinite(long.finding.verdict.probability));
  });

  it('widens a hand-given window of one sample to the 3 the classifier needs, and says so', async () => {
    const t = result.frame.timesMs[2000];
    const one = await analyzeExport(join(NAB, 'series', FILE), { modelDir: MODEL_DIR, incident: { startMs: t, endMs: t } });
    assert.equal(one.finding.incident.endIndex - one.finding.incident.startIndex + 1, 3);
    assert.ok(one.finding.caveats.some((c) => c.includes('widened to 3')));
  });

  it('places the default baseline around the widened window, never over it, and does not speak of a suggestion it did not use', async () => {
    const times = result.frame.timesMs;
    const last = times[times.length - 1];
    // One sample at the very end is widened backwards; the baseline must then end before it.
    const atEnd = await analyzeExport(join(NAB, 'series', FILE), { modelDir: MODEL_DIR, incident: { startMs: last, endMs: last } });
    assert.equal(atEnd.finding.incident.startIndex, times.length - 3);
    assert.ok(atEnd.finding.baseline.endIndex < atEnd.finding.incident.startIndex, JSON.stringify([atEnd.finding.baseline, atEnd.finding.incident]));
    assert.ok(!atEnd.finding.caveats.some((c) => /last quarter|baseline window shares/.test(c)), atEnd.finding.caveats.join('\n'));
  });

  it('says when a hand-given baseline overlaps the incident window', async () => {
    const t = result.frame.timesMs;
    const overlapping = await analyzeExport(join(NAB, 'series', FILE), { modelDir: MODEL_DIR, incident: { startMs: t[2000], endMs: t[2009] }, baseline: { startMs: t[1995], endMs: t[2004] } });
    assert.ok(overlapping.finding.caveats.includes('The baseline window shares 5 of its 10 samples with the incident window, so the changes shown are understated.'), overlapping.finding.caveats.join('\n'));
  });

  it('refuses an export too short for a baseline and an incident window, and a window that leaves no room for a baseline, naming the file', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mt-short-'));
    try {
      const rows = (n: number): string => ['time,cpu_utilization', ...Array.from({ length: n }, (_, i) => `2026-01-01T00:0${i}:00Z,${i}`)].join('\n');
      const five = join(dir, 'five.csv');
      writeFileSync(five, rows(5));
      await assert.rejects(analyzeExport(five, { modelDir: MODEL_DIR }), (e: Error) => e.message === `${five}: expected at least 6 time steps (3 for a baseline, 3 for the incident window) of at least one numeric series, got 5 steps of 1 series`);
      const eight = join(dir, 'eight.csv');
      writeFileSync(eight, rows(8));
      await assert.rejects(
        analyzeExport(eight, { modelDir: MODEL_DIR, incident: { startMs: Date.parse('2026-01-01T00:01:00Z'), endMs: Date.parse('2026-01-01T00:05:00Z') } }),
        (e: Error) => e.message.startsWith(`${eight}: the incident window 2026-01-01T00:01:00.000Z/2026-01-01T00:05:00.000Z leaves fewer than 3 samples before and after it for a baseline`),
      );
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('rejects a window given without a time zone (RFC 3339 §5.6 requires one)', () => {
    assert.throws(() => parseRange('2014-02-26T13:45:00/2014-02-27T06:25:00', '--window'), UsageError);
    assert.deepEqual(parseRange('1996-12-19T16:39:57-08:00/1996-12-20T00:40:00Z', '--window'), { startMs: Date.UTC(1996, 11, 20, 0, 39, 57), endMs: Date.UTC(1996, 11, 20, 0, 40, 0) });
  });
});
