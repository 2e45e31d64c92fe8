import { FEATURES } from '../../../shared/src/features/definitions';
import { trainModel, calibratePlatt, compileModel, withCalibration, type Row } from '../../../shared/src/model/index';
import { toColumns } from '../../../server/src/training/build-dataset';
import { insertModelVersion } from '../../../server/src/model-registry/model-repository';
import type { Database } from '../../../server/src/db/database';

/**
 * A small fixture model for pipeline tests: trained by the real engine on rows
 * where large amounts and card-testing bursts are fraud. It exists to exercise
 * the pipeline (alerts, cases, exactly-once), not to measure accuracy.
 */
export function fixtureModel() {
  const rows: Row[] = [];
  const labels: number[] = [];
  for (let i = 0; i < 2000; i += 1) {
    const amount = (i * 7919) % 3000;
    const small = i % 97 === 0 ? 8 : 0;
    const row: Row = Object.fromEntries(FEATURES.map((f) => [f.name, f.kind === 'numeric' ? 0 : 'x']));
    row.amount = amount;
    row.small_count_1h = small;
    rows.push(row);
    labels.push(amount > 2000 || small > 5 ? 1 : -1);
  }
  const result = trainModel(
    { features: FEATURES.map(({ name, kind }) => ({ name, kind })), columns: toColumns(rows), labels: Int8Array.from(labels) },
    { rounds: 20 },
  );
  const F = compileModel(result.model).scoreColumns(toColumns(rows));
  return withCalibration(result.model, calibratePlatt(F, labels), 'validation');
}

export async function installChampion(db: Database, label = `fixture-${Date.now()}`): Promise<number> {
  await db.sequelize.query("UPDATE model_versions SET role = 'retired' WHERE role IN ('champion', 'challenger')");
  return insertModelVersion(db, { label, role: 'champion', model: fixtureModel() });
}
