import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { AlertKind, UnitSystem } from '@wellkept/core';
import { request } from '../../../lib/api-client';

/** GET /api/account/settings */
export interface AccountSettings {
  name: string;
  email: string;
  unitSystem: UnitSystem;
  timeZone: string;
  quietHours: { start: string; end: string } | null;
}

export type AccountChange = Partial<Omit<AccountSettings, 'email'>>;

export const accountSettingsQueryOptions = () =>
  queryOptions({
    queryKey: ['account', 'settings'] as const,
    queryFn: () => request<AccountSettings>('/account/settings'),
  });

export function useAccountSettings() {
  return useQuery(accountSettingsQueryOptions());
}

/** PATCH /api/account/settings. The session (units, time zone) is refetched after a change. */
export function useUpdateAccount() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: AccountChange) =>
      request<AccountSettings>('/account/settings', { method: 'PATCH', body }),
    onSuccess: (settings) => {
      queryClient.setQueryData(accountSettingsQueryOptions().queryKey, settings);
      return queryClient.invalidateQueries({ queryKey: ['auth', 'me'] });
    },
  });
}

/** GET/PUT /api/account/notifications */
export interface NotificationPreferences {
  kinds: AlertKind[];
  siteIds: string[] | null;
  onOpen: boolean;
  onClear: boolean;
}

export const notificationsQueryOptions = () =>
  queryOptions({
    queryKey: ['account', 'notifications'] as const,
    queryFn: () => request<NotificationPreferences>('/account/notifications'),
  });

export function useNotifications() {
  return useQuery(notificationsQueryOptions());
}

export function useSaveNotifications() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: NotificationPreferences) =>
      request<NotificationPreferences>('/account/notifications', { method: 'PUT', body }),
    onSuccess: (prefs) => queryClient.setQueryData(notificationsQueryOptions().queryKey, prefs),
  });
}
