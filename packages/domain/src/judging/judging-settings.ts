import { JudgingSettings } from '@earmark/contracts';
import { testCaseSettings, type MaskRevision, type StoredJudgingSettings, type TestCase } from '@earmark/db';

/**
 * The stored settings a capture is judged with: those of the mask revision it is judged
 * under (reviewed and approved with its checks); the test case's own only when there is no
 * mask at all.
 */
export function storedSettingsFor(testCase: TestCase, mask: MaskRevision | null): StoredJudgingSettings {
  return mask ? mask.settings : testCaseSettings(testCase);
}

/**
 * The settings a capture is judged with, with the schemas' defaults filled in.
 * @throws ZodError when the stored settings no longer fit the schemas
 */
export function judgingSettingsFor(testCase: TestCase, mask: MaskRevision | null): JudgingSettings {
  return JudgingSettings.parse(storedSettingsFor(testCase, mask));
}

/**
 * Stored settings as the schemas read them (defaults filled in, keys in schema order, so two
 * copies compare by JSON), or as stored when they do not parse.
 */
export function normalizedSettings(stored: StoredJudgingSettings): StoredJudgingSettings {
  const parsed = JudgingSettings.safeParse(stored);
  return parsed.success ? (parsed.data as unknown as StoredJudgingSettings) : stored;
}

/**
 * What a verdict records: the settings exactly as judging read them, or the stored JSON as
 * it was when it does not parse (that verdict is an `error` saying why).
 */
export function settingsToRecord(testCase: TestCase, mask: MaskRevision | null): StoredJudgingSettings {
  return normalizedSettings(storedSettingsFor(testCase, mask));
}
