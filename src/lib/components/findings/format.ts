/** A number for people: at most `digits` decimals, no trailing zeros, a real minus sign. */
export function formatNumber(n: number, digits = 2): string {
	if (!Number.isFinite(n)) return '–';
	const s = String(Number(n.toFixed(digits)));
	return s.startsWith('-') ? `−${s.slice(1)}` : s;
}

/** "12 mm", "0.85 × stud", "80 °C": a value with its unit, or the bare value without one. */
export function withUnit(n: number, unit: string, digits = 2): string {
	return unit ? `${formatNumber(n, digits)} ${unit}` : formatNumber(n, digits);
}
