import { AnalysisSettings, ChannelMap, type JudgingSettings } from '@earmark/contracts';
import { z } from 'zod';
import { issuesByPath, type FieldIssues } from '@/lib/field-issues';

/**
 * A draft's analysis settings and channel map as typed (strings, so half-typed numbers are
 * kept); the contracts' schemas check them on save. The stimulus is shown, not edited here.
 */
export type SettingsFormValues = { transferMethod: '' | 'h1' | 'deconvolution'; transferLo: string; transferHi: string; channelMap: string };

export function settingsToForm(settings: JudgingSettings): SettingsFormValues {
  const band = settings.analysis.transferBandHz;
  return {
    transferMethod: settings.analysis.transferMethod ?? '',
    transferLo: band ? String(band[0]) : '',
    transferHi: band ? String(band[1]) : '',
    channelMap: settings.channelMap.join(', '),
  };
}

const number = (text: string): number | undefined => (text.trim() === '' ? undefined : Number(text.trim()));

const EditableSettings = z.strictObject({ analysis: AnalysisSettings, channelMap: ChannelMap });
export type EditableSettings = z.infer<typeof EditableSettings>;

export function settingsFromForm(values: SettingsFormValues): { ok: true; settings: EditableSettings } | { ok: false; issues: FieldIssues } {
  const analysis: Record<string, unknown> = {};
  if (values.transferMethod) analysis.transferMethod = values.transferMethod;
  const lo = number(values.transferLo);
  const hi = number(values.transferHi);
  if (lo !== undefined || hi !== undefined) analysis.transferBandHz = [lo ?? Number.NaN, hi ?? Number.NaN];
  const channels = values.channelMap
    .split(/[,\s;]+/)
    .filter(Boolean)
    .map((part) => Number(part));
  const parsed = EditableSettings.safeParse({ analysis, channelMap: channels });
  if (!parsed.success) return { ok: false, issues: issuesByPath(parsed.error, ['settings']) };
  return { ok: true, settings: parsed.data };
}
