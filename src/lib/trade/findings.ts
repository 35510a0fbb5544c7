export type Severity = 'pass' | 'warn' | 'fail';

export const SEVERITIES: readonly Severity[] = ['pass', 'warn', 'fail'];

export interface Finding {
	/** Stable rule id from RULES, e.g. 'seat.flat-diameter'. */
	rule: string;
	severity: Severity;
	/** Plain words for the person on site: what is wrong and what to do. */
	message: string;
	/** The measured or computed value the rule looked at, in the rule's unit. */
	value?: number;
	/** The threshold it was compared with. */
	limit?: number;
	/** Where the rule comes from: a standard, a paper, or "common practice". */
	reference: string;
	/** For input findings: the input path the finding is about, e.g. 'point.surface'. */
	field?: string;
	/** For input findings: the value was not given at all (as opposed to given but wrong). */
	missing?: boolean;
}

export type SeverityShape = 'circle' | 'triangle' | 'square';

export interface SeverityMeta {
	severity: Severity;
	/** Higher is worse; used for sorting and for the worst-of. */
	rank: number;
	/** The word shown beside the symbol, so colour is never the only cue. */
	word: string;
	/** The symbol's outline; each severity has a different one. */
	shape: SeverityShape;
	/** A text stand-in for the shape, for CSV, plain text and screen readers. */
	glyph: string;
	/** A design-token name, not a colour: the UI maps it to colours with enough contrast. */
	tone: 'positive' | 'caution' | 'negative';
	description: string;
}

export const SEVERITY_META: Readonly<Record<Severity, SeverityMeta>> = {
	pass: {
		severity: 'pass',
		rank: 0,
		word: 'Good',
		shape: 'circle',
		glyph: '●',
		tone: 'positive',
		description: 'Meets the rule.'
	},
	warn: {
		severity: 'warn',
		rank: 1,
		word: 'Check',
		shape: 'triangle',
		glyph: '▲',
		tone: 'caution',
		description: 'Needs a look, a measurement or a decision before installing.'
	},
	fail: {
		severity: 'fail',
		rank: 2,
		word: 'Fail',
		shape: 'square',
		glyph: '■',
		tone: 'negative',
		description: 'Does not meet the rule: change the point, the mounting or the route.'
	}
};

/** The worst severity among the findings; 'pass' when there are none. */
export function worstSeverity(findings: ReadonlyArray<Pick<Finding, 'severity'>>): Severity {
	let worst: Severity = 'pass';
	for (const f of findings) {
		const meta = SEVERITY_META[f.severity];
		// An unknown severity is treated as the worst, so a corrupted finding never reads as good.
		if (!meta) return 'fail';
		if (meta.rank > SEVERITY_META[worst].rank) worst = f.severity;
	}
	return worst;
}

/** Worst first, then by rule id, so a list reads the same everywhere. */
export function sortFindings<T extends Finding>(findings: readonly T[]): T[] {
	return [...findings].sort((a, b) => SEVERITY_META[b.severity].rank - SEVERITY_META[a.severity].rank || a.rule.localeCompare(b.rule));
}

export function countBySeverity(findings: ReadonlyArray<Pick<Finding, 'severity'>>): Record<Severity, number> {
	const counts: Record<Severity, number> = { pass: 0, warn: 0, fail: 0 };
	for (const f of findings) if (f.severity in counts) counts[f.severity]++;
	return counts;
}
