// Where labels go on the canvas, in screen pixels, so that none covers another label or a
// marker: keep-out zone labels first (they matter most), then the selected items, then points
// by severity (fails first), then cable route labels. Each label tries a few spots around its
// anchor; the farther spots get a leader line back to the marker; a label with no free spot
// is left out (it shows again when zoomed in). Pure: no canvas, unit-tested.

export interface LabelRequest {
	id: string;
	/** Anchor on screen (the marker's centre or a route's end), px. */
	x: number;
	y: number;
	w: number;
	h: number;
	/** Keep-out radius around the anchor (the marker), px; 0 for no marker. */
	r: number;
	/** Higher goes first. */
	priority: number;
	/** Placed even where it overlaps (zone labels, the selection). */
	always?: boolean;
	/** Only the first spot (labels that belong exactly there, e.g. a zone's name at its corner). */
	fixed?: { dx: number; dy: number };
}

export interface PlacedLabel {
	id: string;
	/** Top-left of the label box on screen, px. */
	left: number;
	top: number;
	/** From the marker's edge to the label, when the label sits away from it. */
	leader: [number, number, number, number] | null;
}

interface Box {
	l: number;
	t: number;
	r: number;
	b: number;
}

const CELL = 64;

class Grid {
	#cells = new Map<number, Box[]>();
	#keys(b: Box, f: (k: number) => void) {
		for (let cx = Math.floor(b.l / CELL); cx <= Math.floor(b.r / CELL); cx++)
			for (let cy = Math.floor(b.t / CELL); cy <= Math.floor(b.b / CELL); cy++) f(cx * 100003 + cy);
	}
	add(b: Box) {
		this.#keys(b, (k) => {
			const list = this.#cells.get(k);
			if (list) list.push(b);
			else this.#cells.set(k, [b]);
		});
	}
	hits(b: Box): boolean {
		let hit = false;
		this.#keys(b, (k) => {
			if (hit) return;
			for (const o of this.#cells.get(k) ?? []) {
				if (o.l < b.r && o.r > b.l && o.t < b.b && o.b > b.t) {
					hit = true;
					return;
				}
			}
		});
		return hit;
	}
}

/** The spots a label tries, as offsets of its top-left from the anchor, nearest first. */
export function spots(r: number, w: number, h: number): Array<{ dx: number; dy: number; far: boolean }> {
	const gap = 4;
	const far = 22;
	return [
		{ dx: r + gap, dy: -h / 2, far: false },
		{ dx: -r - gap - w, dy: -h / 2, far: false },
		{ dx: -w / 2, dy: -r - gap - h, far: false },
		{ dx: -w / 2, dy: r + gap, far: false },
		{ dx: r + far, dy: -r - far - h / 2, far: true },
		{ dx: r + far, dy: r + far - h / 2, far: true },
		{ dx: -r - far - w, dy: -r - far - h / 2, far: true },
		{ dx: -r - far - w, dy: r + far - h / 2, far: true }
	];
}

function leaderTo(req: LabelRequest, box: Box): [number, number, number, number] {
	// From the marker's rim towards the nearest point of the label box.
	const tx = Math.max(box.l, Math.min(req.x, box.r));
	const ty = Math.max(box.t, Math.min(req.y, box.b));
	const d = Math.hypot(tx - req.x, ty - req.y) || 1;
	return [req.x + ((tx - req.x) / d) * req.r, req.y + ((ty - req.y) / d) * req.r, tx, ty];
}

/**
 * Places labels greedily by priority. `markers` are the other markers on screen (centre and
 * radius): labels keep off them as well.
 */
export function placeLabels(requests: LabelRequest[], markers: Array<{ x: number; y: number; r: number }> = []): PlacedLabel[] {
	const grid = new Grid();
	const markerGrid = new Grid();
	for (const m of markers) markerGrid.add({ l: m.x - m.r, t: m.y - m.r, r: m.x + m.r, b: m.y + m.r });
	const out: PlacedLabel[] = [];
	const order = [...requests].sort((a, b) => b.priority - a.priority);
	for (const req of order) {
		const tries = req.fixed ? [{ ...req.fixed, far: false }] : spots(req.r, req.w, req.h);
		let placed = false;
		for (const s of tries) {
			const box = { l: req.x + s.dx, t: req.y + s.dy, r: req.x + s.dx + req.w, b: req.y + s.dy + req.h };
			if (!req.always && (grid.hits(box) || markerGrid.hits(box))) continue;
			grid.add(box);
			out.push({ id: req.id, left: box.l, top: box.t, leader: s.far ? leaderTo(req, box) : null });
			placed = true;
			break;
		}
		if (!placed && req.always) {
			const s = tries[0];
			const box = { l: req.x + s.dx, t: req.y + s.dy, r: req.x + s.dx + req.w, b: req.y + s.dy + req.h };
			grid.add(box);
			out.push({ id: req.id, left: box.l, top: box.t, leader: null });
		}
	}
	return out;
}
