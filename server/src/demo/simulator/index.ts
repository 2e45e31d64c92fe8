/**
 * The demo's invented world: Fernhollow Credit Union (an invented issuer), its
 * cardholders and merchants, and seeded, deterministic card traffic with the
 * trade's fraud patterns mixed in. Pure: no I/O, no clock, no global state
 * beyond caches.
 */
export { createDemoWorld, DEMO_SEED } from './world';
export type { DemoWorld, DemoWorldOptions, HistoryOptions, LiveOptions } from './world';
export { toIngestPayload } from './payload';
export type { Channel, FraudPattern, FraudType, IngestTransaction, SimulatedTransaction, TransactionTruth } from './payload';
export type { Cardholder, DemoCard, Habits } from './cardholders';
export type { Merchant } from './merchants';
export type { City } from './places';
export { ipRegion } from './network';
export { cardholderName } from './cardholders';
