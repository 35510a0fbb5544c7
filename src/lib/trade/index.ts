/**
 * Spotface trade module: pure rules and calculations for sensor-installation surveys.
 * No I/O and no platform APIs, so the browser, the server and the tests share it.
 */
export * from './units';
export * from './bearing';
export * from './cable';
export * from './severity-zones';
export * from './geometry';
export * from './findings';
export * from './thresholds';
export * from './rules';
export {
	evaluatePoint,
	studHoleRequirement,
	STUD_DIAMETER_MM,
	STUD_THREAD,
	type StudHoleRequirement,
	SURFACES,
	MOUNTINGS,
	MATERIALS,
	SPEED_MODES,
	SURFACE_LABEL,
	MOUNTING_LABEL,
	MATERIAL_LABEL,
	type Surface,
	type Mounting,
	type Material,
	type SpeedMode,
	type MachineInput,
	type PointInput,
	type RouteInput,
	type PointEvaluationInput
} from './evaluate-point';
export * from './evaluate-machine';
export * from './evaluate-board';
export * from './evaluate-install';
export * from './checklist';
export * from './job-plan';
export * from './finding-units';
export * from './calculators';
