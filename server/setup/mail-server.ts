// The local fake SMTP server as its own process (npm start, npm run dev).
import { startFakeSmtp } from '../../src/lib/server/mail/fake-smtp';

const dir = process.env.MAIL_CAPTURE_DIR ?? '.data/mail';
const port = Number(process.env.SMTP_FAKE_PORT ?? 2525);
const smtp = await startFakeSmtp({ dir, port });
console.log(`Local test mail server on ${smtp.url}, keeping messages in ${dir}`);
const stop = () => smtp.close().then(() => process.exit(0));
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
