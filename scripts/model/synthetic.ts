/**
 * Seeded synthetic card transactions for demos and the benchmark (invented
 * data: never a check value in tests). Rows are drawn class-conditionally:
 * the label first (about 1% fraud), then features whose distributions shift
 * with the label, so the signal is spread over many weak features the way a
 * real fraud set's is.
 *
 * 30 features: log-normal amounts, hour of day, an MCC-like categorical,
 * a country-like categorical, a channel categorical, velocity-like counts,
 * ages and distances with some missing values, and noise features.
 */
import { mulberry32 } from '../../shared/src/model/binning';
import type { FeatureColumns, FeatureSpec } from '../../shared/src/model/types';

export interface SyntheticSet {
  features: FeatureSpec[];
  columns: FeatureColumns;
  labels: Int8Array;
  /** Transaction amount (same as the `amount` feature), for money-weighted recall. */
  amount: Float64Array;
  /** Epoch milliseconds, rows spread over `days` days in time order. */
  timestamp: Float64Array;
}

const MCCS = ['5411', '5812', '5541', '5999', '5311', '4121', '5732', '5691', '7011', '4511', '5967', '7995', '4829', '5816', '6051', '5944', '5912', '5814', '4814', '5300'];
const MCC_FRAUD_BOOST: Record<string, number> = { '5967': 6, '7995': 5, '4829': 8, '5816': 4, '6051': 7, '5944': 3, '5732': 2 };
const COUNTRIES = ['GB', 'FR', 'DE', 'ES', 'IT', 'NL', 'IE', 'BE', 'PT', 'PL', 'SE', 'US', 'CA', 'BR', 'NG', 'RU', 'CN', 'IN', 'AE', 'TR'];
const COUNTRY_FRAUD_BOOST: Record<string, number> = { NG: 6, RU: 5, BR: 3, AE: 3, TR: 2, US: 1.5, CN: 2 };
const CHANNELS = ['chip', 'contactless', 'ecom', 'moto', 'swipe'];

export function syntheticFraudSet(n: number, seed = 42, days = 30): SyntheticSet {
  const rand = mulberry32(seed);
  const normal = () => {
    // Box-Muller; one value per call keeps the stream simple.
    const u = Math.max(rand(), 1e-300);
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rand());
  };
  const poisson = (lambda: number) => {
    let k = 0;
    let p = Math.exp(-lambda);
    let s = p;
    const u = rand();
    while (u > s && k < 200) {
      k++;
      p *= lambda / k;
      s += p;
    }
    return k;
  };
  const pick = (list: string[], boost: Record<string, number> | null, zipf: number) => {
    // Zipf-like base weights; fraud rows multiply some entries by a boost.
    let tot = 0;
    const ws = list.map((c, i) => {
      const v = (1 / Math.pow(i + 1, zipf)) * (boost ? (boost[c] ?? 1) : 1);
      tot += v;
      return v;
    });
    let u = rand() * tot;
    for (let i = 0; i < list.length; i++) {
      u -= ws[i];
      if (u <= 0) return list[i];
    }
    return list[list.length - 1];
  };
  const numericNames = [
    'amount', 'hour', 'amount_to_avg_30d', 'txn_count_1h', 'txn_count_24h', 'txn_count_7d', 'distinct_merchants_24h',
    'distance_from_home_km', 'card_age_days', 'device_age_days', 'merchant_risk', 'failed_pin_24h', 'declines_24h',
    'minutes_since_last_txn', 'is_card_present', 'is_new_merchant', 'account_age_days', 'avg_amount_30d',
    'cross_border_7d', 'ip_distance_km', 'noise_1', 'noise_2', 'noise_3', 'noise_4', 'noise_5', 'noise_6', 'noise_7',
  ];
  const catNames = ['mcc', 'country', 'channel'];
  const features: FeatureSpec[] = [
    ...numericNames.map((name) => ({ name, kind: 'numeric' as const })),
    ...catNames.map((name) => ({ name, kind: 'categorical' as const })),
  ];
  const num: Record<string, Float64Array> = {};
  for (const k of numericNames) num[k] = new Float64Array(n);
  const mcc = new Array<string | null>(n);
  const country = new Array<string | null>(n);
  const channel = new Array<string | null>(n);
  const labels = new Int8Array(n);
  const timestamp = new Float64Array(n);
  const t0 = Date.UTC(2025, 0, 1);
  const span = days * 86_400_000;
  for (let i = 0; i < n; i++) {
    const fraud = rand() < 0.01;
    labels[i] = fraud ? 1 : -1;
    const z = fraud ? 1 : 0;
    // Signals are deliberately weak one by one (shift of a fraction of a standard deviation).
    const amount = Math.exp(3.4 + 0.35 * z + (1.1 + 0.25 * z) * normal());
    num.amount[i] = Math.round(amount * 100) / 100;
    const night = rand() < (fraud ? 0.35 : 0.12);
    num.hour[i] = night ? Math.floor(rand() * 6) : 6 + Math.floor(rand() * 18);
    num.amount_to_avg_30d[i] = Math.exp(0.3 * z + 0.8 * normal());
    num.txn_count_1h[i] = poisson(fraud ? 1.4 : 0.6);
    num.txn_count_24h[i] = poisson(fraud ? 5 : 3.5);
    num.txn_count_7d[i] = poisson(fraud ? 22 : 18);
    num.distinct_merchants_24h[i] = poisson(fraud ? 3 : 2);
    num.distance_from_home_km[i] = rand() < 0.1 ? NaN : Math.exp(2 + 0.5 * z + 1.5 * normal());
    num.card_age_days[i] = Math.floor(Math.exp(6 - 0.4 * z + normal()));
    num.device_age_days[i] = rand() < (fraud ? 0.2 : 0.05) ? NaN : Math.floor(Math.exp(4.5 - 0.5 * z + 1.2 * normal()));
    const mr = Math.min(1, Math.max(0, 0.2 + 0.08 * z + 0.12 * normal()));
    num.merchant_risk[i] = Math.round(mr * 1000) / 1000;
    num.failed_pin_24h[i] = poisson(fraud ? 0.3 : 0.05);
    num.declines_24h[i] = poisson(fraud ? 0.6 : 0.15);
    num.minutes_since_last_txn[i] = Math.floor(Math.exp(5 - 0.5 * z + 1.6 * normal()));
    num.is_card_present[i] = rand() < (fraud ? 0.3 : 0.6) ? 1 : 0;
    num.is_new_merchant[i] = rand() < (fraud ? 0.5 : 0.25) ? 1 : 0;
    num.account_age_days[i] = rand() < 0.02 ? NaN : Math.floor(Math.exp(7 - 0.3 * z + 0.9 * normal()));
    num.avg_amount_30d[i] = Math.round(Math.exp(3.4 + 0.8 * normal()) * 100) / 100;
    num.cross_border_7d[i] = poisson(fraud ? 1.0 : 0.4);
    num.ip_distance_km[i] = rand() < 0.3 ? NaN : Math.exp(3 + 0.6 * z + 1.8 * normal());
    for (let k = 1; k <= 7; k++) num[`noise_${k}`][i] = k % 2 ? normal() : Math.floor(rand() * 100);
    mcc[i] = pick(MCCS, fraud ? MCC_FRAUD_BOOST : null, 1.1);
    country[i] = rand() < 0.005 ? null : pick(COUNTRIES, fraud ? COUNTRY_FRAUD_BOOST : null, 1.6);
    channel[i] = pick(CHANNELS, fraud ? { ecom: 2.5, moto: 2 } : null, 0.8);
    timestamp[i] = t0 + Math.floor((i / n) * span);
  }
  const columns: FeatureColumns = { ...num, mcc, country, channel };
  return { features, columns, labels, amount: num.amount, timestamp };
}
