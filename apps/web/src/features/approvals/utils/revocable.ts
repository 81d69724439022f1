import type { WaiverDto } from '@earmark/contracts';

/**
 * Whether to offer "Revoke": only to someone who may decide waivers (the approve button's
 * rule), and only on an approved waiver still in force; one past its date is expiring anyway.
 */
export function isRevocable(waiver: WaiverDto, mayDecideWaivers: boolean): boolean {
  return mayDecideWaivers && waiver.state === 'approved' && waiver.active;
}
