import { createContext, useContext, type ReactNode } from 'react';
import type { UnitSystem } from '@wellkept/core';

/** The signed-in person's display choices, provided once by the app shell. */
export interface PersonSettings {
  unitSystem: UnitSystem;
  timeZone: string;
}

const fallback: PersonSettings = {
  unitSystem: 'us',
  timeZone: Intl.DateTimeFormat().resolvedOptions().timeZone,
};
const PersonSettingsContext = createContext<PersonSettings>(fallback);

export function PersonSettingsProvider(props: { value: PersonSettings; children: ReactNode }) {
  return (
    <PersonSettingsContext.Provider value={props.value}>
      {props.children}
    </PersonSettingsContext.Provider>
  );
}

/** Unit system and time zone for every figure and time shown. */
export function usePersonSettings(): PersonSettings {
  return useContext(PersonSettingsContext);
}
