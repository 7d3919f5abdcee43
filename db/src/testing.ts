export {
  createTestDatabase,
  useTestDatabase,
  testServerUrl,
  type TestDatabase,
} from './testing/test-database.js';
export { freePort, testCluster, TEMPLATE_DATABASE } from './testing/global-setup.js';
export { startMailCatcher, type MailCatcher, type CaughtMail } from './testing/mail-catcher.js';
