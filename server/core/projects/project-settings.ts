import { projectSettingsSchema, type ProjectSettings } from '../../../shared/schemas/project-settings';
import { invalidInput } from '../errors';
import type { Project } from '../models';

/** The processing settings as a project row holds them, unchecked. */
export function storedSettings(project: Project): Record<keyof ProjectSettings, unknown> {
  return {
    sampleFps: project.sampleFps,
    workingSize: project.workingSize,
    deltas: project.deltas,
    estimator: project.estimator,
    estimatorParams: project.estimatorParams,
    flagThresholds: project.flagThresholds,
  };
}

/**
 * Checks a project's settings as a whole, as the worker will read them; a 400 naming the field (for example
 * `estimatorParams.winsize`) when they could not work. Called on every save, so a saved project never fails in the
 * worker on its settings.
 */
export function checkProjectSettings(settings: Record<keyof ProjectSettings, unknown>): ProjectSettings {
  const result = projectSettingsSchema.safeParse(settings);
  if (!result.success) throw invalidInput('body', result.error);
  return result.data;
}

/** The settings the worker runs with; `null` with the first problem when a row predates these checks. */
export function readProjectSettings(project: Project): { settings: ProjectSettings } | { problem: string } {
  const result = projectSettingsSchema.safeParse(storedSettings(project));
  if (result.success) return { settings: result.data };
  const issue = result.error.issues[0]!;
  return { problem: `${issue.path.join('.')} ${issue.message}` };
}
