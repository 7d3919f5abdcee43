import { Injectable } from '@nestjs/common';
import argon2 from 'argon2';

/**
 * argon2id with the package's defaults (64 MiB, 3 passes): slow and salted on purpose.
 * `verifyUnknown` spends the same time when no account matches, so response time does not
 * tell an attacker which e-mail addresses have accounts.
 */
@Injectable()
export class PasswordHasher {
  private dummy: Promise<string> | undefined;

  hash(password: string): Promise<string> {
    return argon2.hash(password, { type: argon2.argon2id });
  }

  async verify(hash: string, password: string): Promise<boolean> {
    try {
      return await argon2.verify(hash, password);
    } catch {
      return false;
    }
  }

  async verifyUnknown(password: string): Promise<false> {
    this.dummy ??= this.hash('no account has this password');
    await this.verify(await this.dummy, password);
    return false;
  }
}
