/** One reason a curator may give for a rejection: a stable code stored with the verdict and the words shown. */
export interface RejectReason {
  code: string;
  label: string;
}

/** The list every installation starts with; admins edit it (`PUT /api/settings/reject-reasons`). */
export const DEFAULT_REJECT_REASONS: readonly RejectReason[] = Object.freeze([
  { code: 'too-dark', label: 'Too dark' },
  { code: 'overexposed', label: 'Overexposed' },
  { code: 'blurry', label: 'Blurry' },
  { code: 'no-motion', label: 'No motion' },
  { code: 'camera-shake', label: 'Camera shake' },
  { code: 'scene-cuts', label: 'Scene cuts' },
  { code: 'duplicate', label: 'Duplicate' },
  { code: 'privacy-concern', label: 'Privacy concern' },
  { code: 'off-topic', label: 'Off-topic' },
  { code: 'other', label: 'Other' },
]);

/** The key of the reject-reasons list in the settings table. */
export const REJECT_REASONS_SETTING = 'reject-reasons';
