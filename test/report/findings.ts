import type { Finding } from '../../src/findings.js';

/** A `spike_reversal` finding of one day, with the key the checks give it. */
export const spikeFinding = (severity: Finding['severity'], start: string, series = 'S1'): Finding => ({
  check: 'spike_reversal',
  severity,
  series_id: series,
  start,
  end: start,
  message: 'm',
  evidence: {},
  key: `spike_reversal|${series}|${start}`,
});
