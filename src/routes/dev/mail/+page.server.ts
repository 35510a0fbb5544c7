import { error } from '@sveltejs/kit';
import { context } from '$lib/server/context';
import { readCapturedMail } from '$lib/server/mail/fake-smtp';
import { isLoopback } from '$lib/server/auth/client-address';
import type { PageServerLoad } from './$types';

// The developer's view of the local test mail server: every captured message, reset and
// sign-up links included. Off unless DEV_MAIL_VIEWER=1 (and MAIL_CAPTURE_DIR is set), and even
// then only for requests from this machine. It is not part of any organisation's product.
export const load: PageServerLoad = (event) => {
	const { config } = context();
	if (!config.devMailViewer || !config.mailCaptureDir) error(404, 'Not found');
	let peer = '';
	try {
		peer = event.getClientAddress();
	} catch {
		// no address: refused below
	}
	if (!isLoopback(peer)) error(404, 'Not found');
	return { mail: readCapturedMail(config.mailCaptureDir).slice(0, 200), dir: config.mailCaptureDir };
};
