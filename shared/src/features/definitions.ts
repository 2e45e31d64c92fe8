import type { FeatureSpec, Row } from '../model/types';

/**
 * The features every transaction is scored on, computed at ingest time by the
 * scoring worker (velocity state in Redis) and stored with the transaction, so
 * training reads exactly what scoring saw.
 */
export interface FeatureDefinition extends FeatureSpec {
  /** A short label for reason codes and charts. */
  label: string;
  /** Unit shown beside raw values ("", "USD", "km", "km/h", "s", "×"). */
  unit: string;
  description: string;
}

export const FEATURES: FeatureDefinition[] = [
  { name: 'amount', kind: 'numeric', label: 'amount', unit: '', description: 'Transaction amount in major units of its currency' },
  { name: 'mcc', kind: 'categorical', label: 'merchant category', unit: '', description: 'ISO 18245 merchant category code' },
  { name: 'mcc_high_risk', kind: 'numeric', label: 'high-risk category', unit: '', description: '1 when the merchant category is one the trade treats as high-risk' },
  { name: 'merchant_country', kind: 'categorical', label: 'merchant country', unit: '', description: 'ISO 3166-1 alpha-2 country of the merchant' },
  { name: 'foreign', kind: 'numeric', label: 'foreign', unit: '', description: "1 when the merchant country differs from the card's home country (its first seen country)" },
  { name: 'card_present', kind: 'numeric', label: 'card present', unit: '', description: '1 when the card was present' },
  { name: 'channel', kind: 'categorical', label: 'channel', unit: '', description: 'pos, ecommerce, atm, moto or contactless' },
  { name: 'hour_utc', kind: 'numeric', label: 'hour (UTC)', unit: 'h', description: 'Hour of day of the transaction, UTC' },
  { name: 'txn_count_1h', kind: 'numeric', label: 'transactions in last hour', unit: '', description: "Card's transactions in the hour before this one" },
  { name: 'txn_count_24h', kind: 'numeric', label: 'transactions in last day', unit: '', description: "Card's transactions in the 24 hours before this one" },
  { name: 'amount_sum_1h', kind: 'numeric', label: 'spend in last hour', unit: '', description: "Sum of the card's amounts in the hour before" },
  { name: 'amount_sum_24h', kind: 'numeric', label: 'spend in last day', unit: '', description: "Sum of the card's amounts in the 24 hours before" },
  { name: 'small_count_1h', kind: 'numeric', label: 'tiny amounts in last hour', unit: '', description: 'Transactions under 2.00 in the hour before (card testing)' },
  { name: 'distinct_merchants_24h', kind: 'numeric', label: 'merchants in last day', unit: '', description: 'Distinct merchants in the 24 hours before' },
  { name: 'seconds_since_prev', kind: 'numeric', label: 'time since previous', unit: 's', description: "Seconds since the card's previous transaction" },
  { name: 'distance_km', kind: 'numeric', label: 'distance from previous', unit: 'km', description: 'Great-circle distance from the previous located transaction' },
  { name: 'speed_kmh', kind: 'numeric', label: 'implied speed', unit: 'km/h', description: 'Distance over time since the previous located transaction' },
  { name: 'amount_vs_usual', kind: 'numeric', label: 'amount vs usual', unit: '×', description: "Amount over the card's running mean amount (after 3 transactions)" },
  { name: 'new_device', kind: 'numeric', label: 'new device', unit: '', description: '1 when the device id was not seen on this card before' },
];

export const FEATURE_NAMES = FEATURES.map((f) => f.name);

/** Transaction facts the features are computed from (no card number). */
export interface FeatureInput {
  amount: number;
  mcc: string;
  mccHighRisk: boolean;
  merchantCountry: string;
  cardPresent: boolean;
  channel: string;
  occurredAt: Date;
}

/** What the per-card velocity state answers for one transaction (before it is added). */
export interface VelocitySnapshot {
  homeCountry: string | null;
  count1h: number;
  count24h: number;
  sum1h: number;
  sum24h: number;
  small1h: number;
  distinctMerchants24h: number;
  secondsSincePrev: number | null;
  distanceKm: number | null;
  /** Mean amount of the card's earlier transactions, when there are at least 3. */
  usualAmount: number | null;
  /** null when the transaction carries no device id. */
  newDevice: boolean | null;
}

/** Speeds over short gaps are noise (same terminal, clock skew): below 60 s no speed is computed. */
const MIN_SECONDS_FOR_SPEED = 60;

/** Builds the model's input row from the transaction and its velocity snapshot. */
export function featureRow(t: FeatureInput, v: VelocitySnapshot): Row {
  const speed =
    v.distanceKm !== null && v.secondsSincePrev !== null && v.secondsSincePrev >= MIN_SECONDS_FOR_SPEED
      ? v.distanceKm / (v.secondsSincePrev / 3600)
      : null;
  return {
    amount: t.amount,
    mcc: t.mcc,
    mcc_high_risk: t.mccHighRisk ? 1 : 0,
    merchant_country: t.merchantCountry,
    foreign: v.homeCountry === null ? 0 : v.homeCountry === t.merchantCountry ? 0 : 1,
    card_present: t.cardPresent ? 1 : 0,
    channel: t.channel,
    hour_utc: t.occurredAt.getUTCHours(),
    txn_count_1h: v.count1h,
    txn_count_24h: v.count24h,
    amount_sum_1h: round2(v.sum1h),
    amount_sum_24h: round2(v.sum24h),
    small_count_1h: v.small1h,
    distinct_merchants_24h: v.distinctMerchants24h,
    seconds_since_prev: v.secondsSincePrev,
    distance_km: v.distanceKm === null ? null : round2(v.distanceKm),
    speed_kmh: speed === null ? null : round2(speed),
    amount_vs_usual: v.usualAmount !== null && v.usualAmount > 0 ? round2(t.amount / v.usualAmount) : null,
    new_device: v.newDevice === null ? null : v.newDevice ? 1 : 0,
  };
}

function round2(x: number): number {
  return Math.round(x * 100) / 100;
}
