// What the board page hands to the board: facts from SQL that the Yjs document does not hold.
import type { MachineInput } from '../trade';

export interface SupplyOption {
	id: string;
	name: string;
	tag: string | null;
	voltageV: number;
	areaName: string | null;
}

export interface BoardContext {
	boardId: string;
	title: string;
	surveyId: string;
	surveyTitle: string;
	machine: { id: string; name: string; tag: string | null; hazardousArea: boolean; input: MachineInput };
	media: { url: string; width: number; height: number; kind: 'photo' | 'drawing' } | null;
	supplyPoints: SupplyOption[];
	/** The organisation's threshold overrides as stored (settings key 'thresholds'). */
	thresholds: Record<string, unknown> | null;
	user: { id: string; name: string; role: string };
	/** Role allows writing, the survey is not approved and the board is not frozen. */
	canEdit: boolean;
	/** Engineer or admin: may flag, reject or approve points. */
	canDecide: boolean;
	frozen: boolean;
}
