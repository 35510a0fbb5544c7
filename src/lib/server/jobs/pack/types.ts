// What a job pack is drawn from. The jobs module fills this from the job's rows (and the
// approved revision rows behind it); the pack renderer turns it into a PDF. Keeping the two
// apart lets the pack be tested from a plain object and the jobs module from its rows.
import type { ChecklistStep, SafetyCaution } from '../../../trade/checklist';

export type PaperSize = 'A4' | 'Letter';

export interface JobPackFinding {
	severity: 'pass' | 'warn' | 'fail';
	rule: string;
	message: string;
}

/** The seat preparation one point needs, by mounting method (fields that do not apply are null). */
export interface JobPackPreparation {
	mounting: 'stud' | 'bonded_pad' | 'magnet' | null;
	/** Diameter to spot-face or grind flat, mm. */
	spotFaceDiameterMm: number | null;
	/** Tapped stud: thread (e.g. "M6"), tap drill, hole depth, full-thread depth, engagement needed for the housing material. */
	thread: string | null;
	tapDrillMm: number | null;
	holeDepthMm: number | null;
	threadDepthMm: number | null;
	threadEngagementMm: number | null;
	/** Bonded pad: pad, adhesive and the minimum cure wait before loading the pad. */
	pad: string | null;
	adhesive: string | null;
	cureWaitMin: number | null;
}

export interface JobPackPoint {
	/** The number drawn on the board image, 1-based, unique within the pack. */
	number: number;
	label: string;
	machine: string;
	component: string;
	direction: string | null;
	material: string | null;
	preparation: JobPackPreparation;
	torqueLimitNm: number | null;
	cableLengthM: number | null;
	conductor: string | null;
	supplyPoint: string | null;
	notes: string;
	findings: JobPackFinding[];
	checklist: ChecklistStep[];
}

export interface JobPackRoute {
	/** Number of the point the route serves. */
	pointNumber: number;
	/** Polyline in board image pixels. */
	vertices: Array<[number, number]>;
}

export interface JobPackZone {
	label: string;
	kind: string;
	polygon: Array<[number, number]>;
}

export interface JobPackBoardImage {
	title: string;
	/** Display image bytes (JPEG or PNG) of the board photo; null when the board has no photo. */
	image: { bytes: Uint8Array; mime: 'image/jpeg' | 'image/png'; width: number; height: number } | null;
	/** Board coordinate space (pixels of the display image); used when image is null too. */
	width: number;
	height: number;
	points: Array<{ number: number; x: number; y: number; worst: 'pass' | 'warn' | 'fail' }>;
	routes: JobPackRoute[];
	zones: JobPackZone[];
}

export interface JobPackMaterialLine {
	item: string;
	quantity: number;
	unit: string;
	note?: string;
}

export interface JobPackInput {
	paper: PaperSize;
	organisation: string;
	job: {
		reference: string;
		title: string;
		survey: string;
		site: string;
		revision: number;
		status: string;
		assignee: string | null;
		outageStart: string | null;
		outageEnd: string | null;
		due: string | null;
		/** True when any point needs drilling or tapping (or the engineer asks for it). */
		lockoutRequired: boolean;
		generatedAt: string;
	};
	boards: JobPackBoardImage[];
	points: JobPackPoint[];
	tools: string[];
	materials: JobPackMaterialLine[];
	/** The cable margin the materials include, stated on the pack (e.g. 0.15 for 15 %). */
	cableMargin: number;
	cautions: readonly SafetyCaution[];
}
