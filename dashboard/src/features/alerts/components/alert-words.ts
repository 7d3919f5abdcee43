import type { AlertKind } from '@wellkept/core';

/**
 * What each alert means for an owner, in plain words, and what Wellkept does about it. The
 * labels themselves come from core (ALERT_LABELS).
 */
export const OWNER_WORDS: Record<AlertKind, string> = {
  low_charge:
    'The batteries are lower than they should be. Using less power for a while helps them recover.',
  overnight_sag:
    'The batteries dropped more than usual overnight, which can mean a new load or an ageing battery.',
  float_stuck:
    'The switch that tells the pump when the tank is full or low does not seem to be working.',
  dry_run: 'A pump is running but not moving water as it should.',
  short_cycling: 'A pump is switching on and off more often than it should.',
  gateway_silent: 'The monitor at your site has stopped reporting. Your water system may be fine.',
  water_low: 'Stored water is running low for your usual use.',
  no_charge: 'The batteries are not charging even though there is sun.',
};
