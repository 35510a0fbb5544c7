import { requireNumber } from './validate';

/** Standard acceleration of free fall, m/s² (ISO 80000-3). */
export const G_N = 9.80665;

/**
 * Sinusoidal relations only: for a single frequency, v = a/(2πf) and x = v/(2πf).
 * Broadband signals need integration in the frequency domain, not these.
 * Amplitudes are magnitudes, so negative values are rejected.
 */
export function velocityFromAcceleration(accelMS2: number, freqHz: number): number {
	requireNumber('accelMS2', accelMS2, { min: 0, unit: 'm/s²' });
	requireNumber('freqHz', freqHz, { min: 0, exclusiveMin: true, unit: 'Hz' });
	return accelMS2 / (2 * Math.PI * freqHz);
}

export function displacementFromVelocity(velocityMS: number, freqHz: number): number {
	requireNumber('velocityMS', velocityMS, { min: 0, unit: 'm/s' });
	requireNumber('freqHz', freqHz, { min: 0, exclusiveMin: true, unit: 'Hz' });
	return velocityMS / (2 * Math.PI * freqHz);
}

export function accelerationFromVelocity(velocityMS: number, freqHz: number): number {
	requireNumber('velocityMS', velocityMS, { min: 0, unit: 'm/s' });
	requireNumber('freqHz', freqHz, { min: 0, exclusiveMin: true, unit: 'Hz' });
	return velocityMS * 2 * Math.PI * freqHz;
}

export function gToMS2(g: number): number {
	requireNumber('g', g);
	return g * G_N;
}

export function ms2ToG(accelMS2: number): number {
	requireNumber('accelMS2', accelMS2);
	return accelMS2 / G_N;
}

/** r.m.s. of a sine from its peak amplitude: peak/√2. */
export function rmsFromPeak(peak: number): number {
	requireNumber('peak', peak, { min: 0 });
	return peak / Math.SQRT2;
}

export function peakFromRms(rms: number): number {
	requireNumber('rms', rms, { min: 0 });
	return rms * Math.SQRT2;
}

export function peakToPeakFromPeak(peak: number): number {
	requireNumber('peak', peak, { min: 0 });
	return 2 * peak;
}

export function msToMmS(velocityMS: number): number {
	requireNumber('velocityMS', velocityMS);
	return velocityMS * 1000;
}

export function mmSToMs(velocityMmS: number): number {
	requireNumber('velocityMmS', velocityMmS);
	return velocityMmS / 1000;
}

export function rpmToHz(rpm: number): number {
	requireNumber('rpm', rpm, { min: 0 });
	return rpm / 60;
}

export function hzToRpm(hz: number): number {
	requireNumber('hz', hz, { min: 0 });
	return hz * 60;
}
