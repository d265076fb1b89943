/** The batch's capture metadata as the form holds it, and its conversion to the upload's text fields. */
export interface CaptureForm {
  site: string;
  rig: string;
  capturedAt: Date | null;
  /** "+02:00": the zone of the place where the footage was shot, which need not be the viewer's. */
  utcOffset: string;
  tags: string[];
  notes: string;
}

function offsetLabel(minutes: number): string {
  const sign = minutes < 0 ? '-' : '+';
  const abs = Math.abs(minutes);
  return `${sign}${String(Math.floor(abs / 60)).padStart(2, '0')}:${String(abs % 60).padStart(2, '0')}`;
}

/** Every UTC offset in use around the world, from −12:00 to +14:00 in quarter hours where they occur. */
export const UTC_OFFSETS: string[] = [
  -720, -660, -600, -570, -540, -480, -420, -360, -300, -240, -210, -180, -120, -60, 0, 60, 120, 180, 210, 240, 270,
  300, 330, 345, 360, 390, 420, 480, 525, 540, 570, 600, 630, 660, 720, 765, 780, 840,
].map(offsetLabel);

export function emptyCaptureForm(): CaptureForm {
  return {
    site: '',
    rig: '',
    capturedAt: null,
    utcOffset: offsetLabel(-new Date().getTimezoneOffset()),
    tags: [],
    notes: '',
  };
}

/** The wall-clock time picked on site, written with the chosen offset (ISO 8601), as the upload expects. */
export function captureFields(form: CaptureForm): Record<string, string> {
  const at = form.capturedAt;
  const pad = (value: number) => String(value).padStart(2, '0');
  const capturedAt = at
    ? `${at.getFullYear()}-${pad(at.getMonth() + 1)}-${pad(at.getDate())}T${pad(at.getHours())}:${pad(at.getMinutes())}:00` +
      form.utcOffset
    : '';
  return { site: form.site, rig: form.rig, capturedAt, tags: form.tags.join(','), notes: form.notes };
}
