// Starts the durable queue in this process once the app initialises: pg-boss on the app's pool,
// the mail and webhook workers, and a sweep for rows written while no queue ran. If the database
// is not reachable yet, it tries again every few seconds; nothing is lost meanwhile (the rows wait).
import { context } from '../context';
import { webhookDeliverer, sweepDeliveries } from '../integration/webhooks';
import { startBoss, WEBHOOK_QUEUE } from './boss';

let started = false;

export function startQueue() {
	if (started) return;
	started = true;
	const attempt = async () => {
		const { handle, mailer, config } = context();
		try {
			await startBoss(
				handle.pool,
				config.queue.pollSeconds,
				[
					{ name: mailer.queueName, policy: config.queue.mail, handler: mailer.deliver },
					{ name: WEBHOOK_QUEUE, policy: config.queue.webhook, handler: webhookDeliverer(handle.db, config.webhookPolicy) }
				],
				async () => {
					await mailer.sweep();
					await sweepDeliveries(handle.db);
				}
			);
		} catch (e) {
			console.error('[queue] could not start, trying again in 5 s:', e instanceof Error ? e.message : e);
			setTimeout(() => void attempt(), 5000).unref();
		}
	};
	void attempt();
}
