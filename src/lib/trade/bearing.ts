import { collectIssues, requireNumber, requireObject } from './validate';

export interface BearingGeometry {
	/** Number of rolling elements. */
	balls: number;
	/** Rolling-element diameter d, any length unit (same unit as pitchDiameter). */
	ballDiameter: number;
	/** Pitch diameter D, same unit as ballDiameter. */
	pitchDiameter: number;
	/** Contact angle φ in degrees; 0 for a deep-groove ball bearing under radial load. */
	contactAngleDeg?: number;
}

export interface BearingFrequencies {
	/** Fundamental train (cage) frequency, Hz. */
	ftf: number;
	/** Ball (rolling element) spin frequency, Hz. Some references list 2×BSF. */
	bsf: number;
	/** Ball pass frequency, outer race, Hz. */
	bpfo: number;
	/** Ball pass frequency, inner race, Hz. */
	bpfi: number;
}

/**
 * Every problem with a bearing geometry, one message per bad field (each names its field); the
 * checks between fields run once each field is fine on its own.
 */
export function bearingGeometryIssues(g: unknown, field = 'bearing'): string[] {
	const whole = collectIssues([() => requireObject(field, g)]);
	if (whole.length) return whole;
	const o = g as Record<string, unknown>;
	const each = collectIssues([
		() => requireNumber(`${field}.balls`, o.balls, { min: 3, max: 200, integer: true }),
		() => requireNumber(`${field}.ballDiameter`, o.ballDiameter, { min: 0, exclusiveMin: true }),
		() => requireNumber(`${field}.pitchDiameter`, o.pitchDiameter, { min: 0, exclusiveMin: true }),
		() => o.contactAngleDeg === undefined || requireNumber(`${field}.contactAngleDeg`, o.contactAngleDeg, { min: 0, max: 90, unit: '°' })
	]);
	return each.length ? each : collectIssues([() => assertBearingGeometry(g, field)]);
}

/** Validates a bearing geometry, throwing a RangeError naming the bad field. */
export function assertBearingGeometry(g: unknown, field = 'bearing'): BearingGeometry {
	const o = requireObject(field, g);
	const balls = requireNumber(`${field}.balls`, o.balls, { min: 3, max: 200, integer: true });
	const d = requireNumber(`${field}.ballDiameter`, o.ballDiameter, { min: 0, exclusiveMin: true });
	const D = requireNumber(`${field}.pitchDiameter`, o.pitchDiameter, { min: 0, exclusiveMin: true });
	if (d >= D) {
		throw new RangeError(`${field}.ballDiameter (${d}) must be smaller than ${field}.pitchDiameter (${D}); check the units match`);
	}
	// Rolling elements must fit round the pitch circle: n·d < π·D.
	if (balls * d >= Math.PI * D) {
		throw new RangeError(`${field}.balls (${balls}) of diameter ${d} do not fit on a pitch diameter of ${D}`);
	}
	const phi =
		o.contactAngleDeg === undefined ? 0 : requireNumber(`${field}.contactAngleDeg`, o.contactAngleDeg, { min: 0, max: 90, unit: '°' });
	return { balls, ballDiameter: d, pitchDiameter: D, contactAngleDeg: phi };
}

/**
 * Kinematic bearing defect frequencies (Randall & Antoni 2011, "Rolling element bearing
 * diagnostics — a tutorial", MSSP 25:485–520), stationary outer race, rotating inner race:
 *   FTF  = (f_r/2)(1 − (d/D)cos φ)
 *   BPFO = (n f_r/2)(1 − (d/D)cos φ)
 *   BPFI = (n f_r/2)(1 + (d/D)cos φ)
 *   BSF  = (D f_r/(2d))(1 − ((d/D)cos φ)²)
 * Real bearings slip, so measured lines sit 1–2 % away from these.
 */
export function bearingFrequencies(g: BearingGeometry, shaftHz: number): BearingFrequencies {
	const { balls: n, ballDiameter: d, pitchDiameter: D, contactAngleDeg } = assertBearingGeometry(g);
	const fr = requireNumber('shaftHz', shaftHz, { min: 0, max: 2000, unit: 'Hz' });
	const ratio = (d / D) * Math.cos(((contactAngleDeg ?? 0) * Math.PI) / 180);
	return {
		ftf: (fr / 2) * (1 - ratio),
		bsf: ((D * fr) / (2 * d)) * (1 - ratio * ratio),
		bpfo: ((n * fr) / 2) * (1 - ratio),
		bpfi: ((n * fr) / 2) * (1 + ratio)
	};
}
