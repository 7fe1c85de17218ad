import type { ReviewRow } from '../../shared/schemas/import.schema';
import { Random } from './prng';

/*
 * The invented demo scenario: an imaginary retailer, Vellumbrook Mercantile, with five categories of
 * imaginary products and about a year and a half of imaginary reviews. Every name, product, reviewer id and
 * sentence here is made up. The scenario is fully determined by (seed, asOf, weeks).
 */

export const demoRetailer = {
  name: 'Vellumbrook Mercantile',
  description:
    'An invented general-goods retailer used for the Ballast demo. Any likeness to a real shop is accidental.',
} as const;

export const demoDefaultSeed = 0x0ba11a57;
export const demoDefaultWeeks = 78;

export interface DemoCategory {
  slug: string;
  name: string;
  description: string;
  /** Category settings for negative-cluster detection: phrases worth surfacing when they recur. */
  settings: { clusterPhrases: string[] };
}

export interface DemoItem {
  sku: string;
  title: string;
  category: string;
  /** First day the item could be reviewed. */
  launchedOn: Date;
  /** The part it plays in the story, if any. */
  role: DemoStoryKey | 'companion' | null;
}

export type DemoStoryKey = 'thinLeader' | 'buriedStrong' | 'staleItem' | 'negativeBurst' | 'steadyRiser';

export interface DemoStoryElement {
  key: DemoStoryKey;
  sku: string;
  category: string;
  title: string;
  description: string;
  /** Other items that take part in the same element. */
  relatedSkus: string[];
  /** For the negative burst: the phrase that recurs. */
  phrase?: string;
}

export const demoCategories: DemoCategory[] = [
  {
    slug: 'kettles-and-brewers',
    name: 'Kettles & Brewers',
    description: 'Electric and stovetop kettles, pour-over brewers and small tea and coffee gear.',
    settings: {
      clusterPhrases: ['lid hinge cracked', 'leaks at the base', 'plastic taste', 'switch stopped clicking'],
    },
  },
  {
    slug: 'trail-packs',
    name: 'Trail Packs',
    description: 'Day packs, hydration vests and multi-day packs for walking and running.',
    settings: { clusterPhrases: ['strap tore', 'zip split', 'seam came apart', 'buckle snapped'] },
  },
  {
    slug: 'desk-lighting',
    name: 'Desk Lighting',
    description: 'Desk, clamp and task lamps for home offices.',
    settings: { clusterPhrases: ['flickers', 'arm droops', 'clamp cracked', 'buzzing noise'] },
  },
  {
    slug: 'portable-power',
    name: 'Portable Power',
    description: 'Power banks, solar chargers and small power stations.',
    settings: {
      clusterPhrases: [
        'battery swelled',
        'gets hot while charging',
        'stopped holding charge',
        'port came loose',
      ],
    },
  },
  {
    slug: 'garden-tools',
    name: 'Garden Hand Tools',
    description: 'Trowels, shears, forks and other hand tools for the garden.',
    settings: { clusterPhrases: ['blade snapped', 'handle split', 'spring broke', 'rusted quickly'] },
  },
];

export const demoStory: Record<DemoStoryKey, DemoStoryElement> = {
  thinLeader: {
    key: 'thinLeader',
    sku: 'KB-1007',
    category: 'kettles-and-brewers',
    title: 'Keelwood Trail Kettle 1L',
    description:
      'Tops the raw-mean ordering of its category with only 3 reviews, all five stars; no other item in the ' +
      'category has a perfect record. The smoothed score pulls it well down.',
    relatedSkus: [],
  },
  buriedStrong: {
    key: 'buriedStrong',
    sku: 'TP-2031',
    category: 'trail-packs',
    title: 'Tarnholt Ridge Pack 32L',
    description:
      'About 420 reviews with a mean near 4.6: the best-evidenced pack, yet a raw sort puts thin five-star ' +
      'items such as TP-2077 and TP-2078 above it. It leads the smoothed ordering.',
    relatedSkus: ['TP-2077', 'TP-2078'],
  },
  staleItem: {
    key: 'staleItem',
    sku: 'DL-3012',
    category: 'desk-lighting',
    title: 'Pellmere Clamp Lamp Mk II',
    description:
      'A well-rated lamp whose reviews stopped: the newest is at least 430 days before the as-of date, so it is ' +
      'flagged stale.',
    relatedSkus: [],
  },
  negativeBurst: {
    key: 'negativeBurst',
    sku: 'PP-4020',
    category: 'portable-power',
    title: 'Sablecairn Power Bank 20000',
    description:
      'A good baseline (mean about 4.5 over ~300 reviews) and then, in the last three weeks, 18 one-star reviews, ' +
      'most saying the battery swelled: a negative cluster worth reading.',
    relatedSkus: [],
    phrase: 'battery swelled',
  },
  steadyRiser: {
    key: 'steadyRiser',
    sku: 'GT-5008',
    category: 'garden-tools',
    title: 'Wendrigg Pruning Shears Pro',
    description:
      'Reviewed every week; its weekly mean climbs steadily from 3.2 to 5 stars while the weekly volume grows ' +
      'from one review to nine. Over the last 20 weeks its smoothed rank never drops from one week to the next ' +
      'and climbs from the bottom third into the top 10.',
    relatedSkus: [],
  },
};

interface CategoryPlan {
  prefix: string;
  itemCount: number;
  productTypes: string[];
  variants: string[];
  nouns: string[];
  /** Highest typical rating a background item may have (keeps a story element unambiguous). */
  qualityCap: number;
}

const plans: Record<string, CategoryPlan> = {
  'kettles-and-brewers': {
    prefix: 'KB',
    itemCount: 72,
    productTypes: [
      'Kettle',
      'Gooseneck Kettle',
      'Travel Kettle',
      'Pour-Over Brewer',
      'Cold Brew Jar',
      'Milk Frother',
      'Tea Pot',
    ],
    variants: ['0.8L', '1L', '1.5L', '1.7L', '2L', 'Mini', 'Duo'],
    nouns: ['the lid', 'the spout', 'the handle', 'the base', 'the boil time', 'the pour'],
    qualityCap: 4.7,
  },
  'trail-packs': {
    prefix: 'TP',
    itemCount: 112,
    productTypes: ['Trail Pack', 'Day Pack', 'Hydration Vest', 'Summit Pack', 'Hip Pack', 'Roll-Top Pack'],
    variants: ['12L', '18L', '24L', '30L', '38L', '45L', '55L'],
    nouns: [
      'the hip belt',
      'the shoulder straps',
      'the zips',
      'the back panel',
      'the side pockets',
      'the fabric',
    ],
    qualityCap: 4.3,
  },
  'desk-lighting': {
    prefix: 'DL',
    itemCount: 58,
    productTypes: ['Desk Lamp', 'Clamp Lamp', 'Task Lamp', 'Monitor Light Bar', 'Reading Lamp'],
    variants: ['Mk I', 'Mk II', 'Mk III', 'Slim', 'Wide', 'Plus'],
    nouns: ['the arm', 'the dimmer', 'the light colour', 'the clamp', 'the base', 'the switch'],
    qualityCap: 4.7,
  },
  'portable-power': {
    prefix: 'PP',
    itemCount: 136,
    productTypes: ['Power Bank', 'Solar Charger', 'Charging Brick', 'Power Station', 'Battery Case'],
    variants: ['5000', '10000', '20000', '26800', '300W', '600W'],
    nouns: ['the capacity', 'the charging speed', 'the ports', 'the casing', 'the display', 'the cable'],
    qualityCap: 4.7,
  },
  'garden-tools': {
    prefix: 'GT',
    itemCount: 90,
    productTypes: [
      'Hand Trowel',
      'Pruning Shears',
      'Hand Fork',
      'Weeding Hook',
      'Bulb Planter',
      'Loppers',
      'Hand Rake',
    ],
    variants: ['Classic', 'Compact', 'Long Reach', 'Pro', 'Slim'],
    nouns: ['the blade', 'the grip', 'the spring', 'the balance', 'the finish', 'the edge'],
    qualityCap: 4.7,
  },
};

const modelStarts = [
  'Keel',
  'Bram',
  'Thist',
  'Orla',
  'Quen',
  'Sable',
  'Tarn',
  'Wend',
  'Cobb',
  'Fenn',
  'Harl',
  'Lum',
  'Mire',
  'Pell',
  'Rook',
  'Skel',
  'Varn',
  'Yarr',
  'Dunn',
  'Elsk',
  'Gorm',
  'Ilva',
  'Jask',
  'Nolk',
  'Ostra',
  'Pryd',
  'Ull',
  'Zeph',
];
const modelEnds = [
  'wood',
  'mere',
  'ford',
  'lyn',
  'stow',
  'cairn',
  'holt',
  'wick',
  'by',
  'dale',
  'rigg',
  'marsh',
];

const openers: Record<number, string[]> = {
  1: ['Really disappointed.', 'Would not buy again.', 'Sent it back.', 'Not fit for purpose.'],
  2: ['Expected more.', 'Below par.', 'Mixed feelings, mostly bad.', 'Hard to recommend.'],
  3: ['It is fine.', 'Does the job, just.', 'Average for the price.', 'Some good, some bad.'],
  4: ['Pleased overall.', 'Good value.', 'Works well.', 'Happy with it.'],
  5: ['Excellent.', 'Love it.', 'Best one I have owned.', 'Could not be happier.'],
};
const verdicts: Record<number, string[]> = {
  1: [
    '{noun} failed within a month',
    '{noun} felt cheap from day one',
    'nothing about {noun} works as described',
  ],
  2: ['{noun} is flimsy', 'had trouble with {noun}', '{noun} let it down'],
  3: ['{noun} could be better', '{noun} is ordinary', 'no complaints about {noun}, no praise either'],
  4: ['{noun} is well made', 'liked {noun}', '{noun} is better than expected'],
  5: ['{noun} is superb', '{noun} is spot on', 'everything about {noun} is thought through'],
};
const closers = [
  '',
  '',
  ' Delivery was quick.',
  ' Arrived well packed.',
  ' Bought it as a gift.',
  ' Second one in the house.',
];

function reviewText(rng: Random, stars: number, nouns: string[], clusterPhrases: string[]): string {
  const noun = rng.pick(nouns);
  const verdict = rng.pick(verdicts[stars] ?? []).replace('{noun}', noun);
  let text = `${rng.pick(openers[stars] ?? [])} ${verdict.charAt(0).toUpperCase()}${verdict.slice(1)}.`;
  // Background noise: an occasional complaint uses a watched phrase without forming a cluster.
  if (stars <= 2 && rng.chance(0.1)) text += ` The ${rng.pick(clusterPhrases)} problem again.`;
  return text + rng.pick(closers);
}

const day = 24 * 3600 * 1000;

/** Star probabilities (1..5) whose mean grows with the item's typical rating q. */
function starWeights(q: number): number[] {
  return [1, 2, 3, 4, 5].map(
    (k) => Math.exp(-((k - (q + 0.45)) ** 2) / (2 * 0.85 ** 2)) + (k === 1 ? 0.02 : 0),
  );
}

interface DraftReview {
  sku: string;
  title: string;
  category: string;
  stars: number;
  at: number;
  text: string | null;
}

export interface DemoScenarioOptions {
  /** The end of the history; no review is later. */
  asOf: Date;
  seed?: number;
  /** Weeks of history before asOf (at least 64). */
  weeks?: number;
}

export interface DemoScenario {
  retailer: typeof demoRetailer;
  asOf: Date;
  seed: number;
  weeks: number;
  categories: DemoCategory[];
  items: DemoItem[];
  reviews: ReviewRow[];
  story: Record<DemoStoryKey, DemoStoryElement>;
}

class ScenarioBuilder {
  readonly items: DemoItem[] = [];
  readonly drafts: DraftReview[] = [];
  readonly start: number;
  readonly end: number;

  constructor(
    readonly seed: number,
    asOf: Date,
    weeks: number,
  ) {
    this.end = asOf.getTime();
    this.start = this.end - weeks * 7 * day;
  }

  rng(name: string): Random {
    return Random.derive(this.seed, name);
  }

  addItem(item: DemoItem): DemoItem {
    this.items.push(item);
    return item;
  }

  review(item: DemoItem, rng: Random, stars: number, at: number, text?: string | null): void {
    const category = demoCategories.find((c) => c.slug === item.category)!;
    const plan = plans[item.category]!;
    const written =
      text !== undefined
        ? text
        : rng.chance(0.75)
          ? reviewText(rng, stars, plan.nouns, category.settings.clusterPhrases)
          : null;
    this.drafts.push({
      sku: item.sku,
      title: item.title,
      category: item.category,
      stars,
      at: Math.min(at, this.end),
      text: written,
    });
  }

  /** `count` reviews spread uniformly over [from, to]. */
  spread(item: DemoItem, rng: Random, count: number, from: number, to: number, weights: number[]): void {
    for (let i = 0; i < count; i++) {
      const at = from + rng.float() * (to - from);
      this.review(item, rng, rng.weighted(weights) + 1, at);
    }
  }
}

function storyItem(builder: ScenarioBuilder, key: DemoStoryKey): DemoItem {
  const story = demoStory[key];
  return builder.addItem({
    sku: story.sku,
    title: story.title,
    category: story.category,
    launchedOn: new Date(builder.start),
    role: key,
  });
}

function buildStory(b: ScenarioBuilder): void {
  const { start, end } = b;

  const leader = storyItem(b, 'thinLeader');
  const leaderRng = b.rng(leader.sku);
  for (let i = 0; i < 3; i++)
    b.review(leader, leaderRng, 5, end - (10 + 15 * i) * day - leaderRng.float() * day);

  const strong = storyItem(b, 'buriedStrong');
  b.spread(strong, b.rng(strong.sku), 420, start, end, [0.02, 0.01, 0.04, 0.18, 0.75]);
  for (const [sku, title, count] of [
    ['TP-2077', 'Orlawick Hip Pack 4L', 2],
    ['TP-2078', 'Quenby Summit Pack 28L', 1],
  ] as const) {
    const thin = b.addItem({
      sku,
      title,
      category: strong.category,
      launchedOn: new Date(end - 80 * day),
      role: 'companion',
    });
    const rng = b.rng(sku);
    for (let i = 0; i < count; i++) b.review(thin, rng, 5, end - (5 + rng.float() * 60) * day);
  }

  const stale = storyItem(b, 'staleItem');
  b.spread(stale, b.rng(stale.sku), 140, start, end - 430 * day, [0.02, 0.02, 0.06, 0.3, 0.6]);

  const burst = storyItem(b, 'negativeBurst');
  const burstRng = b.rng(burst.sku);
  b.spread(burst, burstRng, 300, start, end - 28 * day, [0.02, 0.02, 0.05, 0.25, 0.66]);
  const burstTexts = [
    'Battery swelled after two weeks and the case split open.',
    'The battery swelled and it no longer sits flat on the desk.',
    'Stopped using it when the battery swelled. Worrying.',
    'Gets hot while charging, then the battery swelled.',
    'Battery swelled overnight while charging a phone.',
    'Gets hot while charging, far too hot to hold.',
  ];
  for (let i = 0; i < 18; i++) {
    const text = i < 12 ? burstTexts[i % 5]! : burstTexts[5]!;
    b.review(burst, burstRng, 1, end - (1 + burstRng.float() * 20) * day, text);
  }
  b.spread(burst, burstRng, 4, end - 24 * day, end, [0, 0, 0.1, 0.4, 0.5]);

  const riser = storyItem(b, 'steadyRiser');
  const riserRng = b.rng(riser.sku);
  const weeks = Math.round((end - start) / (7 * day));
  for (let w = 0; w < weeks; w++) {
    const progress = w / (weeks - 1);
    const count = 1 + Math.round(8 * progress ** 1.5);
    // Exactly the target weekly mean, so the running mean rises without noise.
    const total = Math.round(count * (3.2 + 1.8 * progress));
    const base = Math.floor(total / count);
    for (let i = 0; i < count; i++) {
      const stars = Math.min(5, base + (i < total - base * count ? 1 : 0));
      b.review(riser, riserRng, stars, start + (w + riserRng.float()) * 7 * day);
    }
  }
}

function buildBackground(b: ScenarioBuilder): void {
  for (const category of demoCategories) {
    const plan = plans[category.slug]!;
    const rng = b.rng(category.slug);
    const usedTitles = new Set(b.items.map((i) => i.title));
    for (let n = 0; n < plan.itemCount; n++) {
      let title = '';
      do {
        title = `${rng.pick(modelStarts)}${rng.pick(modelEnds)} ${rng.pick(plan.productTypes)} ${rng.pick(plan.variants)}`;
      } while (usedTitles.has(title));
      usedTitles.add(title);
      const sku = `${plan.prefix}-${1100 + n * 7}`;
      const itemRng = b.rng(sku);
      const launched = itemRng.chance(0.6)
        ? b.start
        : b.start + itemRng.float() * (b.end - b.start - 20 * day);
      const discontinued = itemRng.chance(0.1) ? launched + itemRng.float() * (b.end - launched) : b.end;
      const item = b.addItem({
        sku,
        title,
        category: category.slug,
        launchedOn: new Date(launched),
        role: null,
      });
      // A long tail: many items have a handful of reviews, a few have hundreds.
      const count = itemRng.chance(0.18)
        ? itemRng.int(1, 6)
        : Math.min(900, Math.max(1, Math.round(Math.exp(4 + 1.05 * itemRng.normal()))));
      const quality = Math.min(plan.qualityCap, Math.max(2.2, 3.95 + 0.4 * itemRng.normal()));
      b.spread(item, itemRng, count, launched, discontinued, starWeights(quality));
    }
  }
}

/** The thin leader must be the only perfect record in its category, so no tie muddies the story. */
function keepLeaderUnique(b: ScenarioBuilder): void {
  const leader = demoStory.thinLeader;
  const bySku = new Map<string, DraftReview[]>();
  for (const d of b.drafts)
    if (d.category === leader.category && d.sku !== leader.sku)
      bySku.set(d.sku, [...(bySku.get(d.sku) ?? []), d]);
  for (const reviews of bySku.values()) {
    const last = reviews[reviews.length - 1];
    if (last && reviews.every((r) => r.stars === 5)) last.stars = 4;
  }
}

export function generateDemoScenario(options: DemoScenarioOptions): DemoScenario {
  const seed = options.seed ?? demoDefaultSeed;
  const weeks = options.weeks ?? demoDefaultWeeks;
  if (weeks < 64) throw new Error('The demo needs at least 64 weeks of history');
  const b = new ScenarioBuilder(seed, options.asOf, weeks);
  buildStory(b);
  buildBackground(b);
  keepLeaderUnique(b);

  b.drafts.sort((x, y) => x.at - y.at || x.sku.localeCompare(y.sku));
  const people = b.rng('reviewers');
  const reviewerPool = 18_000;
  const reviews: ReviewRow[] = b.drafts.map((d, i) => {
    const reviewed = Math.floor(d.at / 1000) * 1000;
    const helpfulYes = people.chance(0.55) ? 0 : Math.floor(Math.exp(0.8 + 1.1 * people.normal()));
    const helpfulNo = Math.floor(helpfulYes * people.float() * 0.5) + (people.chance(0.15) ? 1 : 0);
    return {
      reviewId: `vbm-${String(i + 1).padStart(7, '0')}`,
      sku: d.sku,
      title: d.title,
      category: d.category,
      stars: d.stars,
      reviewedAt: new Date(reviewed),
      helpfulYes,
      helpfulNo,
      reviewerId: people.chance(0.05)
        ? null
        : `rv-${String(1 + Math.floor(people.float() ** 2 * reviewerPool)).padStart(6, '0')}`,
      reviewerScore: people.chance(0.35)
        ? Math.round(((people.float() + people.float() + people.float()) / 3) * 100) / 100
        : null,
      verified: people.chance(0.1) ? null : people.chance(0.78),
      text: d.text,
    };
  });

  return {
    retailer: demoRetailer,
    asOf: options.asOf,
    seed,
    weeks,
    categories: demoCategories,
    items: b.items,
    reviews,
    story: demoStory,
  };
}
