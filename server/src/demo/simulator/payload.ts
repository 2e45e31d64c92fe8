import type { Member } from './cardholders';
import type { Merchant } from './merchants';
import { formatMinor, type CurrencyCode } from './money';
import type { Rng } from './prng';

export type Channel = 'pos' | 'ecommerce' | 'atm' | 'moto' | 'contactless';

/** Fraud types the product knows. */
export type FraudType = 'card_not_present' | 'counterfeit' | 'lost_stolen' | 'account_takeover' | 'first_party';

/** The simulator's fraud scenarios; each maps to one fraud type (see fraud-patterns.ts). */
export type FraudPattern =
  | 'card_testing'
  | 'account_takeover'
  | 'impossible_travel'
  | 'odd_hour_high_risk'
  | 'counterfeit_abroad'
  | 'cnp_stolen_details'
  | 'lost_stolen_spree'
  | 'first_party_dispute';

/**
 * Exactly what `POST /api/v1/transactions` takes for one transaction:
 * ```json
 * {"id":"fh-2026113014-0007","occurredAt":"2026-11-30T14:03:00Z","amount":"42.10","currency":"USD",
 *  "card":{"number":"990417…","cardholderId":"ch-17"},
 *  "merchant":{"id":"m-9","name":"Kettle & Pine Grocers","mcc":"5411","country":"US"},
 *  "cardPresent":true,"channel":"pos","location":{"lat":39.74,"lon":-104.99}}
 * ```
 * - `amount`: exact decimal string with the currency's ISO 4217 minor units (JPY none, the others two).
 * - `occurredAt`: ISO 8601 UTC, whole seconds, `Z`.
 * - `deviceId` and `ip` only on card-not-present payments (a shop's terminal is not the cardholder's device);
 *   `ip` always from the documentation ranges (see network.ts).
 * - `location`: the shop for card-present payments, where the shopper's connection geolocates otherwise.
 */
export interface IngestTransaction {
  id: string;
  occurredAt: string;
  amount: string;
  currency: CurrencyCode;
  card: { number: string; cardholderId: string };
  merchant: { id: string; name: string; mcc: string; country: string };
  cardPresent: boolean;
  channel: Channel;
  deviceId?: string;
  ip?: string;
  location?: { lat: number; lon: number };
}

/** Ground truth the simulator knows and a real shop would learn late, or never. */
export interface TransactionTruth {
  fraud: boolean;
  fraudType?: FraudType;
  pattern?: FraudPattern;
  /** Groups the transactions of one fraud scenario (a card-testing burst, one takeover session...). */
  incidentId?: string;
  /**
   * When the label would reach the fraud team: for fraud the chargeback or
   * cardholder report (log-normal, 3 to 45 days later); for a legitimate
   * transaction that gets labelled, the review or customer confirmation
   * (half a day to 30 days). Absent when it would never be labelled.
   */
  labelReportedAt?: Date;
  /** Whether a real shop would ever hold a label for it: most legitimate transactions are never reviewed, and some small fraud is never disputed. */
  wouldBeLabelled: boolean;
}

/** A generated transaction: the ingest payload plus its ground truth. */
export type SimulatedTransaction = IngestTransaction & { truth: TransactionTruth };

/** A transaction before it has an id and labels: what the traffic generators produce. */
export interface Draft {
  /** Epoch ms, whole seconds. */
  t: number;
  member: Member;
  merchant: Merchant;
  minor: number;
  channel: Channel;
  deviceId?: string;
  ip?: string;
  lat: number;
  lon: number;
  fraudType?: FraudType;
  pattern?: FraudPattern;
  incidentId?: string;
  /** For fraud: the chance it is ever reported (default 0.95). */
  reportChance?: number;
  /** For fraud: median days until it is reported (default 12). */
  reportMedianDays?: number;
}

const DAY_MS = 86_400_000;
const round4 = (x: number) => Math.round(x * 1e4) / 1e4;
const clamp = (x: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, x));

export interface LabelPolicy {
  /** Share of legitimate transactions that a shop would ever label. */
  legitLabelShare: number;
}

/** Draws labels and gives the draft its id; the PAN enters the payload here, by reference to the member's card object. */
export function finalise(d: Draft, id: string, rng: Rng, policy: LabelPolicy): SimulatedTransaction {
  const fraud = d.fraudType !== undefined;
  // Labels are drawn even for transactions a caller filters out, so every window consumes its draw the same way.
  const truth: TransactionTruth = fraud
    ? { fraud: true, fraudType: d.fraudType, pattern: d.pattern, wouldBeLabelled: rng.chance(d.reportChance ?? 0.95) }
    : { fraud: false, wouldBeLabelled: rng.chance(policy.legitLabelShare) };
  if (truth.wouldBeLabelled) {
    // Fraud: chargebacks and reports, 3 to 45 days on; legitimate: a review or the customer's word, half a day to 30 days.
    const days = fraud ? clamp(rng.logNormal(d.reportMedianDays ?? 12, 0.65), 3, 45) : clamp(rng.logNormal(4, 0.8), 0.5, 30);
    truth.labelReportedAt = new Date(d.t + Math.round((days * DAY_MS) / 1000) * 1000);
  }
  if (d.incidentId !== undefined) truth.incidentId = d.incidentId;
  const cardPresent = d.merchant.cardPresent;
  const tx: SimulatedTransaction = {
    id,
    occurredAt: `${new Date(d.t).toISOString().slice(0, 19)}Z`,
    amount: formatMinor(d.minor, d.merchant.currency),
    currency: d.merchant.currency,
    card: d.member.cardRef,
    merchant: d.merchant.ref,
    cardPresent,
    channel: d.channel,
    location: { lat: round4(d.lat), lon: round4(d.lon) },
    truth,
  };
  if (d.deviceId !== undefined) tx.deviceId = d.deviceId;
  if (d.ip !== undefined) tx.ip = d.ip;
  return tx;
}

/**
 * The ingest payload of a simulated transaction: a fresh object with exactly
 * the ingest fields (no ground truth), safe to serialise and post.
 */
export function toIngestPayload(t: SimulatedTransaction): IngestTransaction {
  const out: IngestTransaction = {
    id: t.id,
    occurredAt: t.occurredAt,
    amount: t.amount,
    currency: t.currency,
    card: { number: t.card.number, cardholderId: t.card.cardholderId },
    merchant: { id: t.merchant.id, name: t.merchant.name, mcc: t.merchant.mcc, country: t.merchant.country },
    cardPresent: t.cardPresent,
    channel: t.channel,
  };
  if (t.deviceId !== undefined) out.deviceId = t.deviceId;
  if (t.ip !== undefined) out.ip = t.ip;
  if (t.location !== undefined) out.location = { lat: t.location.lat, lon: t.location.lon };
  return out;
}
