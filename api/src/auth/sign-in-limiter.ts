import { Inject, Injectable } from '@nestjs/common';
import { API_CONFIG, type ApiConfig } from '../config/api-config.js';
import { ApiError } from '../common/api-error.js';
import { SignInAttemptsRepository } from './sign-in-attempts.repository.js';

/** The first failure's answer waits this long; each further one twice as long, up to the cap. */
const FIRST_DELAY_MS = 100;
const MAX_DELAY_MS = 2000;

/**
 * Slows password guessing from `sign_in_attempts`: a few failures per account (since its last
 * success) and more per network address, inside a sliding window, then a pause (429). The
 * answer says which limit was hit and when to try again, and never whether the account exists.
 * Before the pause, each failed attempt is answered later than the one before (doubling from
 * 100 ms up to 2 s), so even the allowed attempts cannot be fired in quick succession.
 */
@Injectable()
export class SignInLimiter {
  constructor(
    @Inject(API_CONFIG) private readonly config: ApiConfig,
    private readonly attempts: SignInAttemptsRepository,
  ) {}

  async check(email: string, ip: string): Promise<void> {
    const { perAccount, perAddress, windowSeconds } = this.config.signInLimits;
    const [account, address] = await Promise.all([
      this.attempts.recentAccountFailures(email, windowSeconds, perAccount),
      this.attempts.recentAddressFailures(ip, windowSeconds, perAddress),
    ]);
    if (account.length >= perAccount) {
      throw tooMany('for this account', account[perAccount - 1]!, windowSeconds);
    }
    if (address.length >= perAddress) {
      throw tooMany('from your network address', address[perAddress - 1]!, windowSeconds);
    }
  }

  async record(email: string, ip: string, succeeded: boolean): Promise<void> {
    await this.attempts.record(email, ip, succeeded);
    if (succeeded) return;
    const { perAccount, perAddress, windowSeconds } = this.config.signInLimits;
    const [account, address] = await Promise.all([
      this.attempts.recentAccountFailures(email, windowSeconds, perAccount),
      this.attempts.recentAddressFailures(ip, windowSeconds, perAddress),
    ]);
    // An address is allowed more failures than an account (several people behind one router).
    const ratio = Math.max(1, Math.floor(perAddress / perAccount));
    const failures = Math.max(account.length, Math.ceil(address.length / ratio));
    const delay = Math.min(MAX_DELAY_MS, FIRST_DELAY_MS * 2 ** Math.max(0, failures - 1));
    await new Promise((resolve) => setTimeout(resolve, delay));
  }
}

/** The limit lifts when the oldest counted failure leaves the window. */
function tooMany(scope: string, oldestCounted: Date, windowSeconds: number): ApiError {
  const retryAt = oldestCounted.getTime() + windowSeconds * 1000;
  const minutes = Math.max(1, Math.ceil((retryAt - Date.now()) / 60_000));
  return new ApiError(
    429,
    'too_many_attempts',
    `Too many sign-in attempts ${scope}; try again in ${minutes} minute${minutes === 1 ? '' : 's'}`,
  );
}
