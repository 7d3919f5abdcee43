import { describe, expect, it } from 'vitest';
import { readMailConfig } from '../../src/notifications/mail-config.js';

describe('mail settings', () => {
  it('reads the production variables', () => {
    const c = readMailConfig({
      SMTP_HOST: 'smtp.mail.example',
      SMTP_PORT: '465',
      SMTP_SECURE: 'true',
      SMTP_USER: 'alerts',
      SMTP_PASSWORD: 'hunter-two-secret',
      MAIL_FROM: 'Wellkept <alerts@watch.example>',
      PUBLIC_URL: 'https://watch.example/',
    });
    expect(c.smtp).toEqual({
      host: 'smtp.mail.example',
      port: 465,
      secure: true,
      user: 'alerts',
      password: 'hunter-two-secret',
      from: 'Wellkept <alerts@watch.example>',
    });
    expect(c.publicUrl).toBe('https://watch.example');
  });

  it('names the bad variable and never prints the password', () => {
    let message = '';
    try {
      readMailConfig({
        SMTP_PORT: 'seventy',
        SMTP_SECURE: 'yes',
        SMTP_PASSWORD: 'hunter-two-secret',
      });
    } catch (error) {
      message = (error as Error).message;
    }
    expect(message).toContain('SMTP_PORT');
    expect(message).toContain('SMTP_SECURE');
    expect(message).not.toContain('hunter-two-secret');
    expect(() => readMailConfig({ SMTP_PASSWORD: 'hunter-two-secret' })).toThrow(
      /SMTP_USER: SMTP_PASSWORD is set but SMTP_USER is not/,
    );
  });

  it('retries failed sends from MAIL_RETRY_FIRST_S, doubling up to an hour', () => {
    const standard = readMailConfig({}).retryDelay!;
    expect([1, 2, 3].map(standard)).toEqual([30, 60, 120]);
    expect(standard(20)).toBe(3600);
    const quick = readMailConfig({ MAIL_RETRY_FIRST_S: '0.5' }).retryDelay!;
    expect([1, 2, 3].map(quick)).toEqual([0.5, 1, 2]);
    expect(() => readMailConfig({ MAIL_RETRY_FIRST_S: '0' })).toThrow(/MAIL_RETRY_FIRST_S/);
  });
});
