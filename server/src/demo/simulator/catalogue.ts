/**
 * Merchant categories of the demo world: a real ISO 18245 merchant category
 * code each, whether the category trades face to face or online, how often
 * members use it and how its amounts relate to a member's usual spend. The
 * name parts are invented.
 */
export type CategoryKey =
  | 'grocery'
  | 'fuel'
  | 'restaurant'
  | 'fast_food'
  | 'pharmacy'
  | 'department'
  | 'electronics'
  | 'jewellery'
  | 'taxi'
  | 'hotel'
  | 'atm'
  | 'liquor'
  | 'variety'
  | 'quasi_cash'
  | 'casino'
  | 'money_transfer'
  | 'digital_games'
  | 'digital_media'
  | 'digital_apps'
  | 'marketplace'
  | 'streaming'
  | 'airline'
  | 'online_electronics'
  | 'online_money_transfer'
  | 'online_gambling'
  | 'online_quasi_cash'
  | 'online_jewellery'
  | 'ride_app';

export interface Category {
  readonly key: CategoryKey;
  /** ISO 18245 merchant category code. */
  readonly mcc: string;
  readonly cardPresent: boolean;
  /** Relative share of a member's everyday spending at home. */
  readonly homeWeight: number;
  /** Relative share while travelling. */
  readonly travelWeight: number;
  /** Median amount as a multiple of the member's typical amount. */
  readonly amountFactor: number;
  readonly amountSigma: number;
  /** Some categories price independently of the member (a tank of fuel). */
  readonly fixedMedianUsd?: number;
  /** Cash withdrawals come in banknotes. */
  readonly cash?: boolean;
  /** Invented endings for merchant names. */
  readonly suffixes: readonly string[];
}

const c = (
  key: CategoryKey,
  mcc: string,
  cardPresent: boolean,
  homeWeight: number,
  travelWeight: number,
  amountFactor: number,
  amountSigma: number,
  suffixes: string[],
  extra: { fixedMedianUsd?: number; cash?: boolean } = {},
): Category => Object.freeze({ key, mcc, cardPresent, homeWeight, travelWeight, amountFactor, amountSigma, suffixes: Object.freeze(suffixes), ...extra });

export const CATEGORIES: Readonly<Record<CategoryKey, Category>> = Object.freeze({
  grocery: c('grocery', '5411', true, 22, 4, 1.4, 0.6, ['Grocers', 'Market', 'Provisions', 'Food Hall']),
  fuel: c('fuel', '5541', true, 11, 3, 1, 0.35, ['Fuel', 'Gas & Go', 'Service Station', 'Fuel Stop'], { fixedMedianUsd: 42 }),
  restaurant: c('restaurant', '5812', true, 12, 16, 1.1, 0.55, ['Kitchen', 'Bistro', 'Table', 'Supper Club', 'Brasserie']),
  fast_food: c('fast_food', '5814', true, 10, 8, 0.35, 0.45, ['Burgers', 'Tacos', 'Noodle Bar', 'Bagels', 'Fry Shack']),
  pharmacy: c('pharmacy', '5912', true, 6, 2, 0.7, 0.7, ['Pharmacy', 'Apothecary', 'Chemists']),
  department: c('department', '5311', true, 4, 3, 2, 0.7, ['Department Store', 'Emporium', 'Mercantile']),
  electronics: c('electronics', '5732', true, 1.5, 0.5, 4, 0.8, ['Electronics', 'Circuit House', 'Gadget Works']),
  jewellery: c('jewellery', '5944', true, 0.3, 0.3, 6, 0.8, ['Jewelers', 'Gem Atelier', 'Goldsmiths']),
  taxi: c('taxi', '4121', true, 1.5, 8, 0.8, 0.45, ['Cabs', 'Taxi Co.', 'Car Service']),
  hotel: c('hotel', '7011', true, 0, 9, 5, 0.5, ['Inn', 'Hotel', 'Lodge', 'Suites']),
  atm: c('atm', '6011', true, 3, 3, 1, 0.6, ['Cash Point', 'ATM'], { fixedMedianUsd: 80, cash: true }),
  liquor: c('liquor', '5921', true, 2, 1, 0.8, 0.5, ['Wine & Spirits', 'Bottle Shop', 'Cellars']),
  variety: c('variety', '5999', true, 3, 2, 0.9, 0.7, ['Goods', 'Variety', 'General Store', 'Outfitters']),
  quasi_cash: c('quasi_cash', '6051', true, 0.25, 0.2, 3, 0.6, ['Currency Exchange', 'Money Orders']),
  casino: c('casino', '7995', true, 0.2, 1, 2.5, 0.8, ['Casino', 'Gaming Hall']),
  money_transfer: c('money_transfer', '4829', true, 0.25, 0.2, 3, 0.6, ['Money Transfer', 'Remittance']),
  digital_games: c('digital_games', '5816', false, 3, 1, 0.4, 0.7, ['Games', 'Arcade Online', 'Game Cellar']),
  digital_media: c('digital_media', '5815', false, 3, 1.5, 0.25, 0.6, ['Digital Goods', 'Stream Library', 'E-Books']),
  digital_apps: c('digital_apps', '5817', false, 2, 1, 0.2, 0.6, ['Apps', 'App Shelf', 'Software']),
  marketplace: c('marketplace', '5399', false, 11, 3, 1.5, 0.8, ['Marketplace', 'Online Bazaar', 'Direct']),
  streaming: c('streaming', '4899', false, 2, 0.5, 0.35, 0.3, ['Streaming', 'TV Online']),
  airline: c('airline', '4511', false, 0.6, 1.5, 8, 0.5, ['Air', 'Airways']),
  online_electronics: c('online_electronics', '5732', false, 1.5, 0.3, 3.5, 0.8, ['Tech Online', 'Devices Direct']),
  online_money_transfer: c('online_money_transfer', '4829', false, 0.3, 0.3, 3, 0.7, ['Pay Transfer', 'Remit Online']),
  online_gambling: c('online_gambling', '7995', false, 0.25, 0.2, 1.5, 0.8, ['Sportsbook', 'Wagers']),
  online_quasi_cash: c('online_quasi_cash', '6051', false, 0.15, 0.1, 3, 0.7, ['Coin Exchange', 'Token Desk']),
  online_jewellery: c('online_jewellery', '5944', false, 0.2, 0.1, 5, 0.8, ['Gems Online', 'Jewelry Direct']),
  ride_app: c('ride_app', '4121', false, 2.5, 5, 0.8, 0.45, ['Rides', 'Ride Share']),
});

export const CATEGORY_LIST: readonly Category[] = Object.freeze(Object.values(CATEGORIES));

/** The money-out categories that fraud teams single out (quasi-cash, gambling, money transfer). */
export const HIGH_RISK_MCCS: readonly string[] = Object.freeze(['6051', '7995', '4829']);

/** Invented first words of merchant names. */
export const NAME_WORDS: readonly string[] = Object.freeze([
  'Kettle & Pine', 'Brightwater', 'Lumenvale', 'Juniperhill', 'Copperleaf', 'Bramble', 'Larkspur', 'Sundial', 'Tidewater',
  'Ironmoss', 'Quillfeather', 'Marigold', 'Thistle', 'Driftwood', 'Wrenfield', 'Saffron', 'Meadowlark', 'Silverbirch',
  'Foxglove', 'Hollowbrook', 'Emberly', 'Mossgrove', 'Oakhaven', 'Fernwick', 'Starwick', 'Kestrelmoor', 'Pebblestone',
  'Riverbend', 'Glimmerfield', 'Cobblefen', 'Tanager', 'Aspen Hollow', 'Windrose', 'Cinderwick', 'Whistlestop',
  'Lanternfly', 'Nightjar', 'Bluebell & Sage', 'Granite Hill', 'Quarry Lane', 'Two Herons', 'Saltbrush', 'Pinion',
  'Yarrow', 'Sorrel & Rye', 'Harrowgate', 'Cloudberry', 'Tinderbox', 'Marrowstone', 'Wildrye', 'Clover & Flint',
  'Wheelwright Row', 'Dovecote', 'Gildersleeve', 'Otterburn', 'Hazelmere', 'Red Canyon', 'Stillwater Row', 'Nettlebed',
  'Amberfield', 'Crowsfoot', 'Dunmore Lane', 'Elderberry', 'Fiddlehead', 'Gorsefield', 'Heathcote', 'Inkwell',
  'Jackdaw', 'Kingsfold Row', 'Loomis & Reed', 'Mulberry Lane', 'Northfold', 'Orchard Gate', 'Plover', 'Quince',
  'Rookwood', 'Sweetgrass', 'Tumbleford', 'Umberfield', 'Vervain', 'Willowmere', 'Yellowwood', 'Zephyr Lane',
]);

/** Invented given names and family names of members: combinations, no real person. */
export const GIVEN_NAMES: readonly string[] = Object.freeze([
  'Avery', 'Jordan', 'Maya', 'Elias', 'Priya', 'Mateo', 'Hana', 'Owen', 'Lucia', 'Tobias', 'Nia', 'Felix', 'Iris',
  'Rowan', 'Amara', 'Declan', 'Sofia', 'Kenji', 'Leah', 'Samir', 'Clara', 'Diego', 'Naomi', 'Theo', 'Zara', 'Malik',
  'Esme', 'Ruben', 'Ingrid', 'Caleb', 'Yara', 'Hugo', 'Talia', 'Arjun', 'Beatrix', 'Colm', 'Dalia', 'Ezra', 'Freya',
  'Gideon', 'Helena', 'Isaac', 'Juno', 'Kai', 'Lena', 'Milo', 'Nora', 'Oscar', 'Paloma', 'Quentin', 'Rosa', 'Silas',
]);

export const FAMILY_NAMES: readonly string[] = Object.freeze([
  'Ashdown', 'Brennick', 'Castellan', 'Dunleavy', 'Eberhart', 'Faircloth', 'Galloway', 'Hollins', 'Ibarra', 'Jessop',
  'Kowalczyk', 'Lindqvist', 'Marchetti', 'Nakamura', 'Okafor', 'Pemberton', 'Quiroga', 'Rasmussen', 'Szabo',
  'Thornbury', 'Underhill', 'Valdez', 'Whitcombe', 'Yilmaz', 'Zeller', 'Abernathy', 'Blackwood', 'Cardenas', 'Delacroix',
  'Ellingsen', 'Fitzroy', 'Greenhalgh', 'Haverford', 'Iwasaki', 'Jaramillo', 'Kettering', 'Larkin', 'Moreau', 'Novak',
  'Oyelaran', 'Pryce', 'Rutherford', 'Sandoval', 'Tremaine', 'Varga', 'Wexley', 'Achterberg', 'Bellamy', 'Coughlan',
]);
