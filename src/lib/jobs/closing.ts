// When may an engineer close a job? Pure, shared by the job page (what still stands in the way)
// and the server (which refuses to close otherwise).
import type { Severity } from '../trade/findings';

export interface ClosingPoint {
	label: string;
	record: { worst: Severity | null; findings: Array<{ severity: Severity; message: string }> } | null;
}

export interface CloseBlocker {
	label: string;
	why: string;
}

/** Points that keep a job open: not recorded yet, or recorded with a failing finding. */
export function closeBlockers(points: readonly ClosingPoint[]): CloseBlocker[] {
	const out: CloseBlocker[] = [];
	for (const p of points) {
		if (!p.record) out.push({ label: p.label, why: 'not recorded yet' });
		else if (p.record.worst === 'fail' || p.record.findings.some((f) => f.severity === 'fail')) {
			const first = p.record.findings.find((f) => f.severity === 'fail');
			out.push({ label: p.label, why: first ? first.message : 'a failing finding' });
		}
	}
	return out;
}

export type CloseCheck = { ok: true; blockers: CloseBlocker[] } | { ok: false; blockers: CloseBlocker[]; message: string };

/**
 * Closing is refused while a point is unrecorded or failing, unless the engineer writes why the
 * job is closed anyway (the note is kept with the job).
 */
export function checkClose(points: readonly ClosingPoint[], note: string): CloseCheck {
	const blockers = closeBlockers(points);
	if (blockers.length === 0 || note.trim() !== '') return { ok: true, blockers };
	const list = blockers.map((b) => `${b.label}: ${b.why}`).join(' · ');
	return {
		ok: false,
		blockers,
		message: `${blockers.length === 1 ? 'A point is' : `${blockers.length} points are`} not done (${list}). Record why you close the job anyway, or have the points put right first.`
	};
}
