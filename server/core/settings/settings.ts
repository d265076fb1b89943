import { DEFAULT_FLAG_THRESHOLDS } from '../../../shared/flag-thresholds';
import type { Settings } from '../../../shared/schemas/settings';
import type { Config } from '../config';
import { Setting } from '../models';
import { recordAudit } from '../audit/audit';

const KEYS = {
  projectFlagDefaults: 'project-flag-defaults',
  mailFrom: 'mail-from',
  sessionHours: 'session-hours',
} as const;

const SESSION_SETTING_TTL_MS = 30_000;
let sessionHoursCache: { hours: number; until: number } | null = null;

/** Flag thresholds a new project starts with. */
export async function projectFlagDefaults(): Promise<Settings['projectFlagDefaults']> {
  const row = await Setting.findByPk(KEYS.projectFlagDefaults);
  return (row?.value as Settings['projectFlagDefaults'] | undefined) ?? { ...DEFAULT_FLAG_THRESHOLDS };
}

/** Session lifetime in force, read at most every 30 s (every request asks). */
export async function sessionMaxAgeMs(config: Pick<Config, 'mailFrom' | 'sessionMaxAgeMs'>): Promise<number> {
  if (!sessionHoursCache || sessionHoursCache.until < Date.now()) {
    sessionHoursCache = {
      hours: (await currentSettings(config)).sessionHours,
      until: Date.now() + SESSION_SETTING_TTL_MS,
    };
  }
  return sessionHoursCache.hours * 3600_000;
}

/** The settings in force: what an admin saved, else the defaults from the environment (config.ts). */
export async function currentSettings(config: Pick<Config, 'mailFrom' | 'sessionMaxAgeMs'>): Promise<Settings> {
  const rows = await Setting.findAll({ where: { key: Object.values(KEYS) } });
  const saved = new Map(rows.map((row) => [row.key, row.value]));
  return {
    projectFlagDefaults: (saved.get(KEYS.projectFlagDefaults) as Settings['projectFlagDefaults'] | undefined) ?? {
      ...DEFAULT_FLAG_THRESHOLDS,
    },
    mailFrom: (saved.get(KEYS.mailFrom) as string | undefined) ?? config.mailFrom,
    sessionHours: (saved.get(KEYS.sessionHours) as number | undefined) ?? Math.round(config.sessionMaxAgeMs / 3600_000),
  };
}

export async function saveSettings(settings: Settings, actorId: number): Promise<void> {
  await Setting.sequelize!.transaction(async (transaction) => {
    for (const [field, key] of Object.entries(KEYS) as [keyof Settings, string][]) {
      await Setting.upsert({ key, value: settings[field], updatedById: actorId }, { transaction });
    }
    sessionHoursCache = null;
    await recordAudit(
      {
        actorId,
        action: 'settings.update',
        targetType: 'setting',
        targetId: null,
        detail: { mailFrom: settings.mailFrom, sessionHours: settings.sessionHours },
      },
      transaction,
    );
  });
}
