// The local webhook receiver as its own process (npm start): it stands in for the maintenance
// system and keeps each delivery (headers and body) as a JSON file.
import { startWebhookReceiver } from '../../src/lib/server/integration/test-receiver';

const dir = process.env.WEBHOOK_RECEIVER_DIR ?? '.data/webhooks';
const port = Number(process.env.WEBHOOK_RECEIVER_PORT ?? 2527);
const r = await startWebhookReceiver({ port, dir });
console.log(`Local webhook receiver on ${r.url}, keeping deliveries in ${dir}`);
const stop = () => r.close().then(() => process.exit(0));
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
