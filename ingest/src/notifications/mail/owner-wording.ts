import type { AlertKind } from '@wellkept/core';

/** Owner-facing words for one alert kind: plain language, no trade jargon, no figures needed. */
export interface OwnerWording {
  /** What happened, in one or two sentences. */
  opened: string;
  /** What it means for their water. */
  meaning: string;
  /** Something the owner may do, if anything (never work on batteries, wiring or wells). */
  suggestion?: string;
  /** A caution that goes with the suggestion or with the kind of fault. */
  caution?: string;
  /** The all-clear. */
  cleared: string;
}

const BATTERY_CAUTION =
  'Please leave the battery bank, its enclosure and the wiring closed and to your installer. ' +
  'Batteries store enough energy to cause burns and fires, and some give off flammable gas. ' +
  'Any work on them should follow local electrical codes and be done by a qualified person.';

/**
 * What an owner reads for each kind. Actions suggested here are everyday ones (using less water,
 * telling the installer about a new appliance); anything on batteries, wiring, the well or a
 * pressure vessel is left to licensed practice, and the caution says so.
 */
export const OWNER_WORDING: Readonly<Record<AlertKind, OwnerWording>> = {
  low_charge: {
    opened: 'The battery that runs your water system is low on charge.',
    meaning:
      'If it keeps falling, the pumps may stop until the sun has recharged it. The water already in your tank is still there to use.',
    suggestion: 'If you can, go easy on water and power use until the battery has recovered.',
    caution: BATTERY_CAUTION,
    cleared: 'The battery that runs your water system has recovered its charge.',
  },
  overnight_sag: {
    opened: 'The battery lost more charge overnight than it normally does.',
    meaning:
      'Your water supply is not affected yet. This can be an early sign that something new is drawing power at night, or that the battery is wearing out.',
    suggestion:
      'If you have recently added something that runs at night on this system (a light, a fridge, a heater), let your installer know.',
    caution: BATTERY_CAUTION,
    cleared: 'The battery came through the night normally again.',
  },
  float_stuck: {
    opened:
      'The float switch that tells the pump when to fill your storage tank is not switching as it should.',
    meaning:
      'Either the pump keeps running when the tank is already full, which wears the pump and can overflow the tank, or the tank is getting low without the pump being asked to fill it.',
    cleared: 'The float switch in your storage tank is working normally again.',
  },
  dry_run: {
    opened: 'A pump is running but not moving as much water as it should.',
    meaning:
      'The well may be drawn down, or the pump may be losing water at its intake. Running without water can damage a pump, and your tank may not refill as quickly as usual.',
    suggestion: 'Using less water for a while gives the well time to recover.',
    caution:
      'Please do not open the well cap or pull the pump yourself. Work on a well needs a licensed well contractor, and a well must be disinfected after the pump has been out.',
    cleared: 'The pump is moving water normally again.',
  },
  short_cycling: {
    opened: 'A pump is switching on and off far more often than it should.',
    meaning:
      'This wears the pump out quickly. With a pressure pump it often means the pressure tank needs service; you may notice the water pressure pulsing at the tap.',
    caution:
      'The pressure tank holds water and air under pressure: please leave its valves and fittings to your installer.',
    cleared: 'The pump is starting and stopping normally again.',
  },
  gateway_silent: {
    opened: 'Your water system has stopped sending its readings to Wellkept.',
    meaning:
      'Your water may be running normally; we just cannot see it for now. Often this is a power or connection problem at the monitoring unit.',
    cleared: 'Your water system is sending its readings again.',
  },
  water_low: {
    opened: 'The water stored in your tank is running low for the amount you have been using.',
    meaning: 'If the tank runs dry, the taps will stop until the pump has filled it again.',
    suggestion: 'Using less water for a few days will make what is stored last longer.',
    cleared: 'Your stored water is back to a comfortable level.',
  },
  no_charge: {
    opened: 'The solar panels are not charging the battery, although there should be enough sun.',
    meaning:
      'The battery is running your water system on its own. Without charging it will run down, and then the pumps will stop.',
    suggestion:
      'If you can see from the ground that snow or debris covers the panels, mention it to your installer.',
    caution:
      'Please do not climb onto a roof or touch the panels or their wiring: solar panels make electricity whenever light falls on them. Leave electrical work to your installer and local codes.',
    cleared: 'The solar panels are charging the battery again.',
  },
};
