/**
 * The broker-alone baseline of the ingest benchmark: aedes with every gateway admitted and
 * `authorizePublish` answering at once (no validation, no database), on the port given.
 */
import { createServer } from 'node:net';
import { Aedes } from 'aedes';

const port = Number(process.argv[2]);
const broker = await Aedes.createBroker({
  authenticate: (_client, _username, _password, done) => done(null, true),
  authorizePublish: (_client, _packet, done) => done(null),
});
const server = createServer(broker.handle);
server.listen(port, '127.0.0.1', () => console.log('ready'));
process.on('SIGTERM', () => {
  broker.close(() => server.close(() => process.exit(0)));
});
