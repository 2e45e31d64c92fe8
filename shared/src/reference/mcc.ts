/**
 * Merchant category codes (ISO 18245).
 *
 * ISO 18245 defines the code as four digits, 0001-9999; 0000 is not assigned.
 * Any such code is accepted on ingest (networks assign new codes faster than a
 * table here could follow); the table below only gives common codes a short
 * description for display and a `highRisk` flag.
 *
 * Descriptions are short paraphrases from memory of the ISO 18245 / card
 * network titles. `highRisk` is common practice, not part of ISO 18245: fraud
 * teams and acquirers single out categories where stolen cards turn into cash
 * or resellable value fastest: cash and quasi-cash, money transfer, crypto and
 * other non-fiat currency, stored-value loads, gambling, digital goods,
 * jewellery and precious metals, pawn shops, telemarketing and dating
 * services.
 */
export interface MccInfo {
  readonly description: string;
  /** Common practice: a category the trade treats as high-risk for card fraud. */
  readonly highRisk: boolean;
}

const info = (description: string, highRisk = false): MccInfo => Object.freeze({ description, highRisk });

const MCC_TABLE: Readonly<Record<string, MccInfo>> = Object.freeze({
  '0742': info('Veterinary services'),
  '1520': info('General contractors, residential and commercial'),
  '1711': info('Heating, plumbing and air-conditioning contractors'),
  '1731': info('Electrical contractors'),
  '4111': info('Local and suburban commuter transport'),
  '4112': info('Passenger railways'),
  '4121': info('Taxis and limousines'),
  '4131': info('Bus lines'),
  '4214': info('Motor freight carriers and trucking'),
  '4215': info('Courier services'),
  '4411': info('Steamship and cruise lines'),
  '4511': info('Airlines and air carriers'),
  '4722': info('Travel agencies and tour operators'),
  '4784': info('Tolls and bridge fees'),
  '4789': info('Transportation services, not elsewhere classified'),
  '4812': info('Telecommunication equipment and telephone sales'),
  '4814': info('Telecommunication services'),
  '4816': info('Computer network and information services'),
  '4829': info('Wire transfers and money orders', true),
  '4899': info('Cable, satellite and pay television'),
  '4900': info('Utilities: electric, gas, water, sanitary'),
  '5045': info('Computers, peripherals and software'),
  '5094': info('Precious stones and metals, watches and jewellery', true),
  '5122': info('Drugs and druggist sundries'),
  '5200': info('Home supply warehouse stores'),
  '5251': info('Hardware stores'),
  '5300': info('Wholesale clubs'),
  '5310': info('Discount stores'),
  '5311': info('Department stores'),
  '5331': info('Variety stores'),
  '5399': info('General merchandise, miscellaneous'),
  '5411': info('Grocery stores and supermarkets'),
  '5441': info('Candy, nut and confectionery stores'),
  '5462': info('Bakeries'),
  '5499': info('Convenience and specialty food stores'),
  '5511': info('Car and truck dealers, new and used'),
  '5521': info('Car and truck dealers, used only'),
  '5533': info('Automotive parts and accessories'),
  '5541': info('Service stations'),
  '5542': info('Automated fuel dispensers'),
  '5651': info('Family clothing stores'),
  '5661': info('Shoe stores'),
  '5691': info("Men's and women's clothing stores"),
  '5712': info('Furniture and home furnishings'),
  '5722': info('Household appliance stores'),
  '5732': info('Electronics stores'),
  '5734': info('Computer software stores'),
  '5812': info('Restaurants'),
  '5813': info('Bars, taverns and nightclubs'),
  '5814': info('Fast food restaurants'),
  '5815': info('Digital goods: books, movies, music', true),
  '5816': info('Digital goods: games', true),
  '5817': info('Digital goods: applications', true),
  '5818': info('Digital goods: large digital goods merchants', true),
  '5912': info('Drug stores and pharmacies'),
  '5921': info('Package stores: beer, wine and liquor'),
  '5931': info('Used merchandise and second-hand stores'),
  '5933': info('Pawn shops', true),
  '5941': info('Sporting goods stores'),
  '5942': info('Book stores'),
  '5944': info('Jewellery, watch, clock and silverware stores', true),
  '5945': info('Hobby, toy and game shops'),
  '5947': info('Gift, card, novelty and souvenir shops'),
  '5964': info('Direct marketing: catalogue merchants'),
  '5966': info('Direct marketing: outbound telemarketing', true),
  '5967': info('Direct marketing: inbound telemarketing', true),
  '5968': info('Direct marketing: subscriptions'),
  '5977': info('Cosmetic stores'),
  '5992': info('Florists'),
  '5993': info('Cigar stores and stands'),
  '5999': info('Miscellaneous and specialty retail'),
  '6010': info('Financial institutions: manual cash disbursements', true),
  '6011': info('Financial institutions: automated cash disbursements (ATM)', true),
  '6012': info('Financial institutions: merchandise and services', true),
  '6051': info('Quasi-cash: foreign and non-fiat currency (crypto), money orders, travellers cheques', true),
  '6211': info('Security brokers and dealers'),
  '6300': info('Insurance sales and premiums'),
  '6513': info('Real estate agents and managers: rentals'),
  '6540': info('Stored-value card purchase and load', true),
  '7011': info('Hotels, motels and resorts'),
  '7216': info('Dry cleaners'),
  '7230': info('Beauty and barber shops'),
  '7273': info('Dating and escort services', true),
  '7299': info('Personal services, miscellaneous'),
  '7311': info('Advertising services'),
  '7372': info('Computer programming and data processing'),
  '7399': info('Business services, not elsewhere classified'),
  '7512': info('Car rental agencies'),
  '7523': info('Parking lots and garages'),
  '7538': info('Automotive service shops'),
  '7542': info('Car washes'),
  '7800': info('Government-owned lotteries', true),
  '7801': info('Government-licensed online casinos', true),
  '7802': info('Government-licensed horse and dog racing', true),
  '7832': info('Cinemas'),
  '7922': info('Theatrical producers and ticket agencies'),
  '7941': info('Sports clubs and promoters'),
  '7991': info('Tourist attractions and exhibits'),
  '7994': info('Video game arcades'),
  '7995': info('Betting: lottery tickets, casino chips, off-track betting', true),
  '7996': info('Amusement parks'),
  '7997': info('Membership clubs: sports, recreation'),
  '7999': info('Recreation services, not elsewhere classified'),
  '8011': info('Doctors and physicians'),
  '8021': info('Dentists and orthodontists'),
  '8062': info('Hospitals'),
  '8099': info('Medical services, not elsewhere classified'),
  '8111': info('Legal services and attorneys'),
  '8220': info('Colleges and universities'),
  '8299': info('Schools and educational services'),
  '8398': info('Charitable and social service organisations'),
  '8999': info('Professional services, not elsewhere classified'),
  '9211': info('Court costs'),
  '9222': info('Fines'),
  '9311': info('Tax payments'),
  '9399': info('Government services, not elsewhere classified'),
  '9402': info('Postal services, government only'),
});

const MCC_PATTERN = /^[0-9]{4}$/;

/** ISO 18245: exactly four digits, and 0000 is not a code. */
export function isValidMcc(mcc: unknown): boolean {
  return typeof mcc === 'string' && MCC_PATTERN.test(mcc) && mcc !== '0000';
}

/** Description and risk flag of a code in the table of common codes, or undefined. */
export function mccInfo(mcc: string): MccInfo | undefined {
  return Object.hasOwn(MCC_TABLE, mcc) ? MCC_TABLE[mcc] : undefined;
}

/** Common practice: true for the high-risk categories of the table; unknown codes are not flagged. */
export function isHighRiskMcc(mcc: string): boolean {
  return mccInfo(mcc)?.highRisk ?? false;
}

/** The codes of the table of common codes, sorted. */
export const KNOWN_MCCS: readonly string[] = Object.freeze(Object.keys(MCC_TABLE).sort());
