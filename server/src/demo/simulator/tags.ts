import { hashString } from './prng';

/** One tag per kind of sub-stream, so no two uses of the world seed ever share a stream. */
export const TAG = Object.freeze({
  merchants: hashString('merchants'),
  basics: hashString('member-basics'),
  member: hashString('member'),
  device: hashString('device'),
  trip: hashString('trip'),
  history: hashString('history'),
  live: hashString('live'),
  fraudDevice: hashString('fraud-device'),
});
