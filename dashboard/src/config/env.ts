/**
 * Build-time settings, read once. The dashboard always talks to the API under the same origin
 * (`/api`, proxied by Vite in development), so there is very little to configure.
 */
function readEnv() {
  const apiBase = (import.meta.env.VITE_API_BASE as string | undefined) ?? '/api';
  if (!apiBase.startsWith('/') && !/^https?:\/\//.test(apiBase)) {
    throw new Error(
      `VITE_API_BASE must be a path such as /api or an http(s) URL, not "${apiBase}"`,
    );
  }
  // Where gateways connect (shown with a new gateway's secret).
  const mqttUrl =
    (import.meta.env.VITE_MQTT_URL as string | undefined) ??
    `mqtt://${typeof window === 'undefined' ? '127.0.0.1' : window.location.hostname}:1883`;
  return { apiBase: apiBase.replace(/\/+$/, ''), mqttUrl };
}

export const env = readEnv();
