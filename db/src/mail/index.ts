export {
  enqueueMail,
  claimDueMail,
  markMailSent,
  markMailFailed,
  type OutboxMessage,
  type ClaimedMail,
  type MailCategory,
} from './outbox.js';
export {
  OutboxSender,
  retryDelaySeconds,
  outboxMessageId,
  isServerUnreachable,
  type SmtpSettings,
  type OutboxSenderOptions,
} from './outbox-sender.js';
