import type { Role } from '../../../shared/roles';

export interface RoleGuide {
  title: string;
  summary: string;
  duties: string[];
}

/** What each role does in Kinefold, in the product's own words (DESIGN §1). */
export const ROLE_GUIDES: Record<Role, RoleGuide> = {
  operator: {
    title: 'Bring footage in from the field',
    summary: 'You upload clips with their capture metadata and follow each one until it is ready for review.',
    duties: [
      'Upload many clips at once and tag them with site, rig, capture time and notes.',
      'See at once when a file is unusable, and why.',
      "Follow each clip through processing and see the curator's verdict and reason.",
      "Keep an eye on your project's storage quota.",
    ],
  },
  curator: {
    title: 'Decide which clips become training data',
    summary: 'You work the review queue: look at frames, motion and signals, then accept or reject each clip.',
    duties: [
      'Claim clips so nobody else decides them at the same time.',
      'Check sharpness, exposure, motion and scene cuts before deciding.',
      'Reject in bulk when the flags make a batch obvious; give a reason every time.',
    ],
  },
  engineer: {
    title: 'Build paired views for pre-training',
    summary:
      'You define pairsets from accepted clips, build them into checksummed shards and pull them to training machines.',
    duties: [
      'Choose the views per moment and how they pair: around one core view or every pair.',
      "Read each pairset's statistics and pair difficulty before spending GPU time.",
      'Download shards in the browser or with an API token and curl.',
    ],
  },
  admin: {
    title: 'Keep Kinefold running for everyone',
    summary: 'You manage people, roles and projects, and watch storage so footage and pairsets fit their quotas.',
    duties: [
      'Invite people and give each the role they need.',
      'Create projects and set their quotas and processing settings.',
      "Watch usage, the worker's jobs and the audit trail.",
    ],
  },
};
