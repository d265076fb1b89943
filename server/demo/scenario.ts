/**
 * The demo's invented field campaign: an agricultural-robotics team collecting footage to pre-train the vision of
 * a row-following robot. Places, people and footage are made up; the footage is rendered by ffmpeg on first start.
 */
export const DEMO_PROJECTS = [
  {
    name: 'Terraced orchard, spring pass',
    description: 'Row-following footage from the terraced orchard, shot from the tractor mount and by hand.',
    quotaBytes: 2 * 1024 ** 3,
  },
  {
    name: 'Glasshouse and creek block',
    description: 'Bench rows in the glasshouse and the creek-side block, for the second training round.',
    quotaBytes: 1024 ** 3,
  },
] as const;

export const DEMO_SITES = ['Terraced orchard', 'Glasshouse', 'Creek-side block'] as const;
export const DEMO_RIGS = ['tractor mount', 'handheld'] as const;

/** How a demo clip is rendered from the procedural foliage texture (see footage.ts). */
export interface DemoClipRecipe {
  file: string;
  project: 0 | 1;
  site: (typeof DEMO_SITES)[number];
  rig: (typeof DEMO_RIGS)[number];
  seconds: number;
  /** The camera path over the texture, as ffmpeg expressions of t (seconds). */
  x: string;
  y: string;
  /** Things in the scene that move on their own, drawn over the camera's view. */
  movers?: DemoMover[];
  /** Extra ffmpeg filters after the movers (exposure, blur…). */
  look?: string;
  /** Another texture seed from this second on: a hard scene cut. */
  cutAtS?: number;
  textureSeed: number;
  tags: string[];
  notes: string;
  /** Which flag the clip is made to raise, for the README and the console. */
  expect?: string;
}

/**
 * Something that moves on its own in a demo clip: a flat box whose top-left corner follows ffmpeg expressions of t
 * (seconds) in the 640×360 frame, drawn at 95 % opacity. Expressions use only numbers, t, +, −, *, /, sin and mod,
 * so tests can evaluate them too (tests/helpers/demo-like-footage.ts). Its motion is its own, not the camera's, and
 * it is visible in every frame it is in: a frame tells where things move differently from the rest of the view.
 */
export interface DemoMover {
  x: string;
  y: string;
  width: number;
  height: number;
  /** sRGB as six hex digits. */
  colour: string;
}

/** Pale untreated timber: far from the foliage's greys, so a mover stands out in every view of a frame. */
const TIMBER = 'e9dcc0';
/** An orange plastic crate crossing the frame (in the creek block). */
const CRATE: DemoMover = { x: 'mod(t*110,760)-80', y: '210', width: 70, height: 46, colour: 'c2410c' };
/** A stake passing close to the lens, top to bottom. */
const STAKE: DemoMover = { x: '410', y: 'mod(t*70,520)-120', width: 14, height: 120, colour: TIMBER };
/** A bin trolley pulled across the row, its left edge at `x`. */
const trolley = (x: string, y: number): DemoMover => ({ x, y: String(y), width: 130, height: 80, colour: TIMBER });
/** A picking crate carried across the row, its left edge at `x`. */
const crate = (x: string, y: number): DemoMover => ({ x, y: String(y), width: 96, height: 64, colour: TIMBER });
/** A bird-scare balloon on a pole, swaying in the wind about `x`. */
const balloon = (x: number, swing: number, rate: number, y: number): DemoMover => ({
  x: `${x}+${swing}*sin(t*${rate})`,
  y: String(y),
  width: 64,
  height: 64,
  colour: TIMBER,
});
/** The left edge of a mover crossing right to left at `speed` px/s, back in at the right every `period` px. */
const leftward = (speed: number, period: number) => `660-mod(t*${speed},${period})`;
/** The left edge of a mover crossing left to right, `back` px before the frame's left edge at t = 0. */
const rightward = (speed: number, period: number, back: number) => `mod(t*${speed},${period})-${back}`;

export const DEMO_CLIPS: DemoClipRecipe[] = [
  {
    file: 'orchard-row-03-north.mp4',
    project: 0,
    site: 'Terraced orchard',
    rig: 'tractor mount',
    seconds: 10,
    x: '120+t*38',
    y: '90+t*6',
    movers: [trolley(leftward(176, 860), 150), balloon(300, 150, 1.7, 20)],
    textureSeed: 1,
    tags: ['rows', 'morning'],
    notes: 'Steady pass along row 3; a bin trolley crosses ahead, a bird-scare balloon sways.',
  },
  {
    file: 'orchard-row-04-north.mp4',
    project: 0,
    site: 'Terraced orchard',
    rig: 'tractor mount',
    seconds: 9,
    x: '300+t*42',
    y: '140-t*4',
    movers: [balloon(250, 170, 1.3, 40), trolley(rightward(160, 820, 140), 230)],
    textureSeed: 2,
    tags: ['rows', 'morning'],
    notes: 'Row 4, light wind: a bird-scare balloon sways, a bin trolley crosses.',
  },
  {
    file: 'orchard-row-05-crate.mp4',
    project: 0,
    site: 'Terraced orchard',
    rig: 'tractor mount',
    seconds: 8,
    x: '220+t*30',
    y: '60+t*8',
    movers: [crate(rightward(192, 800, 100), 210), balloon(460, 140, 2.1, 30)],
    textureSeed: 3,
    tags: ['rows', 'obstacle'],
    notes: 'A picking crate crosses the row.',
  },
  {
    file: 'orchard-terrace-turn.mp4',
    project: 0,
    site: 'Terraced orchard',
    rig: 'tractor mount',
    seconds: 8,
    x: '400+200*sin(t/3)',
    y: '200+40*sin(t/2)',
    movers: [trolley(leftward(160, 860), 120), balloon(200, 150, 1.9, 250)],
    textureSeed: 4,
    tags: ['headland', 'turn'],
    notes: 'Turning at the end of the terrace; a bin trolley crosses, a bird-scare balloon sways.',
  },
  {
    file: 'orchard-handheld-walk.mp4',
    project: 0,
    site: 'Terraced orchard',
    rig: 'handheld',
    seconds: 7,
    x: '500+t*22+3*sin(t*2)',
    y: '300+t*5',
    movers: [crate(rightward(208, 820, 100), 250), balloon(180, 120, 2.6, 20)],
    textureSeed: 5,
    tags: ['walk'],
    notes: 'Walking the row by hand; a picking crate is carried past, a bird-scare balloon sways.',
  },
  {
    file: 'orchard-dusk-row-02.mp4',
    project: 0,
    site: 'Terraced orchard',
    rig: 'tractor mount',
    seconds: 7,
    x: '150+t*35',
    y: '120',
    look: 'eq=brightness=-0.42:contrast=0.55',
    textureSeed: 6,
    tags: ['rows', 'dusk'],
    notes: 'Shot after sunset.',
    expect: 'dark',
  },
  {
    file: 'orchard-noon-glare.mp4',
    project: 0,
    site: 'Terraced orchard',
    rig: 'handheld',
    seconds: 6,
    x: '260+t*25',
    y: '180',
    look: 'eq=brightness=0.55:contrast=0.6',
    textureSeed: 7,
    tags: ['glare'],
    notes: 'Sun straight into the lens.',
    expect: 'overexposed',
  },
  {
    file: 'orchard-fogged-lens.mp4',
    project: 0,
    site: 'Terraced orchard',
    rig: 'tractor mount',
    seconds: 6,
    x: '330+t*30',
    y: '210',
    look: 'gblur=sigma=9',
    textureSeed: 8,
    tags: ['rows'],
    notes: 'Condensation on the lens.',
    expect: 'blurry',
  },
  {
    file: 'orchard-parked.mp4',
    project: 0,
    site: 'Terraced orchard',
    rig: 'tractor mount',
    seconds: 6,
    x: '420',
    y: '260',
    textureSeed: 9,
    tags: ['parked'],
    notes: 'Tractor stood still, camera running.',
    expect: 'static',
  },
  {
    file: 'orchard-rough-ground.mp4',
    project: 0,
    site: 'Terraced orchard',
    rig: 'handheld',
    seconds: 6,
    x: '380+14*sin(t*23)+9*sin(t*37)',
    y: '220+12*sin(t*29)+8*sin(t*41)',
    textureSeed: 10,
    tags: ['rough'],
    notes: 'Stumbling over roots.',
    expect: 'shaky',
  },
  {
    file: 'glasshouse-bench-01.mp4',
    project: 1,
    site: 'Glasshouse',
    rig: 'handheld',
    seconds: 9,
    x: '100+t*33',
    y: '240-t*3',
    textureSeed: 11,
    tags: ['benches'],
    notes: 'Bench row 1, irrigation on.',
  },
  {
    file: 'glasshouse-bench-02.mp4',
    project: 1,
    site: 'Glasshouse',
    rig: 'handheld',
    seconds: 8,
    x: '260+t*36',
    y: '160',
    movers: [STAKE],
    textureSeed: 12,
    tags: ['benches', 'stakes'],
    notes: 'Stakes passing the lens.',
  },
  {
    file: 'glasshouse-bench-03.mp4',
    project: 1,
    site: 'Glasshouse',
    rig: 'tractor mount',
    seconds: 8,
    x: '600-t*30',
    y: '120+t*10',
    textureSeed: 13,
    tags: ['benches'],
    notes: 'Reverse pass along bench 3.',
  },
  {
    file: 'glasshouse-door-cut.mp4',
    project: 1,
    site: 'Glasshouse',
    rig: 'handheld',
    seconds: 8,
    cutAtS: 4,
    x: '200+t*30',
    y: '200',
    textureSeed: 14,
    tags: ['benches'],
    notes: 'Recording paused at the door and resumed outside.',
    expect: 'cut-heavy',
  },
  {
    file: 'creek-bank-01.mp4',
    project: 1,
    site: 'Creek-side block',
    rig: 'tractor mount',
    seconds: 10,
    x: '80+t*40',
    y: '300-t*8',
    textureSeed: 15,
    tags: ['rows', 'water'],
    notes: 'Along the creek bank.',
  },
  {
    file: 'creek-bank-02.mp4',
    project: 1,
    site: 'Creek-side block',
    rig: 'tractor mount',
    seconds: 9,
    x: '500+t*28',
    y: '100+t*12',
    movers: [CRATE],
    textureSeed: 16,
    tags: ['rows', 'obstacle'],
    notes: 'A crate left on the track.',
  },
  {
    file: 'creek-footbridge.mp4',
    project: 1,
    site: 'Creek-side block',
    rig: 'handheld',
    seconds: 7,
    x: '700-60*sin(t/2)',
    y: '250+t*9',
    textureSeed: 17,
    tags: ['bridge'],
    notes: 'Crossing the footbridge.',
  },
  {
    file: 'creek-blip.mp4',
    project: 1,
    site: 'Creek-side block',
    rig: 'handheld',
    seconds: 1,
    x: '300',
    y: '300',
    textureSeed: 18,
    tags: ['accidental'],
    notes: 'Pressed record by accident.',
    expect: 'short',
  },
];

/** The same footage as creek-bank-01 exported again at another quality: a near-duplicate. */
export const DEMO_DUPLICATE = { of: 'creek-bank-01.mp4', file: 'creek-bank-01-export.mp4', crf: 30 };

/** A file an operator might drop by mistake; ingest refuses it. */
export const DEMO_NOT_A_VIDEO = { file: 'creek-field-notes.txt', text: 'Creek block: water level high, skip row 9.\n' };

/** What the demo curator decides once the worker has processed these clips; the rest wait in the review queue. */
export const DEMO_VERDICTS: { file: string; decision: 'accept' | 'reject'; reason?: string; comment?: string }[] = [
  { file: 'orchard-row-03-north.mp4', decision: 'accept' },
  { file: 'orchard-row-04-north.mp4', decision: 'accept' },
  { file: 'orchard-row-05-crate.mp4', decision: 'accept', comment: 'Good crossing object for the motion view.' },
  { file: 'orchard-terrace-turn.mp4', decision: 'accept' },
  { file: 'orchard-handheld-walk.mp4', decision: 'accept' },
  { file: 'glasshouse-bench-01.mp4', decision: 'accept' },
  { file: 'orchard-dusk-row-02.mp4', decision: 'reject', reason: 'too-dark', comment: 'Nothing visible in the rows.' },
  { file: 'orchard-fogged-lens.mp4', decision: 'reject', reason: 'blurry' },
];

/**
 * The pairset the demo engineer builds from the accepted orchard clips: each frame with its next frame and with its
 * motion field, at 160 px so the demo stays small on disk.
 */
export const DEMO_PAIRSET = {
  name: 'Orchard rows, frame and motion',
  views: ['frame', 'neighbour', 'motion'] as const,
  deltas: [1],
  graph: 'core' as const,
  coreView: 'frame',
  outputSize: 160,
  split: { val: 0.2, seed: 2026 },
  shardMB: 8,
};

/**
 * The engineer clusters the orchard's moments into five scenes and balances the pairset so no one scene gives more
 * than 60 % of its moments, with clusters taken in turn within each shard. Why 60 %: the steady orchard clips share
 * their movers (pale timber trolleys, crates, balloons), and to the clustering they make two scenes, one of them
 * most of the moments; a share cap needs more clusters than one over the share, so 40 % would keep nothing, while
 * 60 % kept 117 of the 205 moments and 22 of the val clip's in a demo start.
 */
export const DEMO_BALANCE = { clusteringSeed: 2026, k: 5, capShare: 0.6, mixClusters: true } as const;

/** A field hand the admin has invited but who has not joined yet, and the engineer's token for a training machine. */
export const DEMO_INVITATION = { email: 'row-scout@kinefold.test', role: 'operator' as const };
export const DEMO_TOKEN_NAME = 'training-rig-1';
