import type { Database } from '../db/database';
import type { CompareResult, ComparedVersion } from '@shared/api/models';
import { averagePrecision, brierScore, compileModel, rocAuc } from '@shared/model/index';
import { AppError } from '../lib/app-error';
import { buildDataset } from '../training/build-dataset';
import { rocPrCurves } from '../training/evaluation-curves';
import { readAlertingSettings } from '../settings/settings-repository';
import { findVersion, type VersionRecord } from './version-repository';

/**
 * Two versions side by side on one window: both re-score the same stored
 * feature rows (the features scoring computed at the time), with the labels
 * as known now, so the figures differ only by the model. The default window
 * is the newer version's test window (rows neither version trained on when
 * the older one is older).
 */
export async function compareVersions(db: Database, o: { a: number; b: number; from?: Date; to?: Date; labelDelayDays: number }): Promise<CompareResult> {
  if (o.a === o.b) throw AppError.badRequest('Choose two different versions to compare.');
  const [a, b] = await Promise.all([findVersion(db, o.a), findVersion(db, o.b)]);
  if (!a || !b) throw AppError.notFound('No such model version.');
  const newer = a.summary.id > b.summary.id ? a : b;
  const test = newer.metrics.windows?.test;
  const from = o.from ?? (test ? new Date(test[0]) : null);
  const to = o.to ?? (test ? new Date(test[1]) : null);
  if (!from || !to) throw AppError.badRequest('Give the window to compare on (from, to): these versions do not record a test window.');
  if (!(from < to)) throw AppError.badRequest('The window must end after it starts.');

  const data = await buildDataset(db, { from, to, labelsAsOf: new Date(), labelDelayDays: o.labelDelayDays, unlabelledAsLegitimate: true });
  const n = data.counts.rows;
  if (n === 0 || data.counts.fraud === 0 || data.counts.fraud === n) {
    throw AppError.badRequest(`The window holds ${n} usable transactions with ${data.counts.fraud} fraud: both classes are needed to compare.`);
  }
  const { threshold } = await readAlertingSettings(db);
  const side = (v: VersionRecord): ComparedVersion => {
    const compiled = compileModel(v.model);
    const margin = compiled.scoreColumns(data.set.columns);
    const probability = Float64Array.from(margin, (m) => compiled.probability(m));
    let alerts = 0;
    let caught = 0;
    for (let i = 0; i < n; i++) {
      if (probability[i] >= threshold) {
        alerts++;
        if (data.set.labels[i] === 1) caught++;
      }
    }
    const tw = v.metrics.windows?.train;
    return {
      id: v.summary.id,
      label: v.summary.label,
      role: v.summary.role,
      rocAuc: rocAuc(margin, data.set.labels),
      averagePrecision: averagePrecision(margin, data.set.labels),
      brier: brierScore(probability, data.set.labels),
      curves: rocPrCurves(margin, probability, data.set.labels),
      alerts,
      precision: alerts > 0 ? caught / alerts : null,
      recall: caught / data.counts.fraud,
      overlapsTraining: tw ? new Date(tw[0]) <= to && new Date(tw[1]) >= from : false,
    };
  };
  return {
    window: { from: (data.window?.from ?? from).toISOString(), to: (data.window?.to ?? to).toISOString() },
    rows: n,
    fraud: data.counts.fraud,
    threshold,
    versions: [side(a), side(b)],
  };
}
