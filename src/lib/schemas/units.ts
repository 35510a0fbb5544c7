// Which units a form's numbers were typed in. Forms that show measurements send the system they
// were drawn in (hidden field `units`), so a value typed in inches is read as inches even if the
// person changed their preference in another tab meanwhile; without it, the person's preference.
import { z } from 'zod';
import { UNIT_SYSTEMS, type UnitSystem } from '../trade';

export const unitSystemSchema = z.enum(UNIT_SYSTEMS, { error: 'Choose metric or US customary units.' });

export const unitPreferenceSchema = z.object({ unitSystem: unitSystemSchema });

export function unitSystemOfForm(form: FormData, fallback: UnitSystem): UnitSystem {
	const sent = form.get('units');
	const parsed = unitSystemSchema.safeParse(sent);
	return parsed.success ? parsed.data : fallback;
}
