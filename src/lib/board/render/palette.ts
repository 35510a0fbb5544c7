// Canvas colours. Severity is never shown by colour alone: the marker's outline (circle,
// triangle, square) and the word beside it carry it too (SEVERITY_META).
import { SEVERITY_META, type Severity } from '../../trade';

export const TONE: Record<'positive' | 'caution' | 'negative', { fill: string; ink: string }> = {
	positive: { fill: '#1f9d55', ink: '#1d7a3e' },
	caution: { fill: '#f2a900', ink: '#8a5a00' },
	negative: { fill: '#d32f2f', ink: '#b3261e' }
};

export function severityColour(s: Severity) {
	return TONE[SEVERITY_META[s].tone];
}

export const BRAND = '#1f5f8b';
export const INK = '#17202a';
export const HALO = '#ffffff';
export const KEEP_OUT = '#c62828';
export const KEEP_OUT_FILL = 'rgba(198, 40, 40, 0.16)';

export const flat = (pts: ReadonlyArray<readonly [number, number]>) => pts.flatMap((p) => [p[0], p[1]]);
