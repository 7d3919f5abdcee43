import { QueryClientProvider } from '@tanstack/react-query';
import { render } from '@testing-library/react';
import type { ReactNode } from 'react';
import { MemoryRouter } from 'react-router';
import type { UnitSystem } from '@wellkept/core';
import { createQueryClient } from '../src/lib/query-client';
import { PersonSettingsProvider } from '../src/lib/person-settings';

/** Renders a component with the app's providers and the given person's unit system. */
export function renderWithApp(ui: ReactNode, options: { unitSystem?: UnitSystem } = {}) {
  const client = createQueryClient();
  return render(
    <QueryClientProvider client={client}>
      <PersonSettingsProvider
        value={{ unitSystem: options.unitSystem ?? 'us', timeZone: 'America/Denver' }}
      >
        <MemoryRouter>{ui}</MemoryRouter>
      </PersonSettingsProvider>
    </QueryClientProvider>,
  );
}
