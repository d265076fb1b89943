import { browserTimeZone, readCaptureTime } from '../../../shared/capture/capture-time';

/** The batch's capture metadata as the form holds it, and its conversion to the upload's text fields. */
export interface CaptureForm {
  site: string;
  rig: string;
  /** The capture time as typed or picked; read against `timeZone` when the batch is sent. */
  capturedText: string;
  /** The zone of the place where the footage was shot, which need not be the viewer's (IANA name). */
  timeZone: string;
  tags: string[];
  notes: string;
}

export function emptyCaptureForm(): CaptureForm {
  return { site: '', rig: '', capturedText: '', timeZone: browserTimeZone(), tags: [], notes: '' };
}

/** The capture time as the upload expects it (ISO 8601 with the zone's offset), or why it cannot be sent. */
export function captureTimeOf(form: CaptureForm): { iso: string } | { refused: string } {
  const reading = readCaptureTime(form.capturedText, form.timeZone);
  if (reading.kind === 'refused') return { refused: reading.message };
  return { iso: reading.kind === 'time' ? reading.iso : '' };
}

export function captureFields(form: CaptureForm, capturedAt: string): Record<string, string> {
  return { site: form.site, rig: form.rig, capturedAt, tags: form.tags.join(','), notes: form.notes };
}
