// Mentions in comment bodies. The comment box inserts `@[Name](user-id)` when a member is picked;
// a plain `@name@example.com` (an e-mail address) is a mention too. Names alone are not parsed:
// two members may share a name, and a name can contain spaces. Pure, shared by browser and server.

/** `@[display name](user id)`; the name is for reading only, the id decides who is told. */
const TOKEN = /@\[([^\]\n]{1,120})\]\(([A-Za-z0-9_.:-]{1,100})\)/g;
/** `@someone@example.com`, not preceded by a word character (so `a@b.c` is not a mention). */
const EMAIL = /(^|[^\w@])@([A-Za-z0-9._%+-]{1,64}@[A-Za-z0-9.-]{1,190}\.[A-Za-z]{2,24})/g;

export interface MentionRefs {
	userIds: string[];
	emails: string[];
}

export function parseMentions(body: string): MentionRefs {
	const userIds = new Set<string>();
	const emails = new Set<string>();
	for (const m of body.matchAll(TOKEN)) userIds.add(m[2]);
	for (const m of body.matchAll(EMAIL)) emails.add(m[2].toLowerCase());
	return { userIds: [...userIds], emails: [...emails] };
}

/** The text to insert for a picked member. Brackets in the name would end the token early. */
export function mentionToken(member: { id: string; name: string }): string {
	return `@[${member.name.replace(/[[\]()\n]/g, ' ').trim() || 'member'}](${member.id})`;
}

export type BodyPart = { text: string } | { mention: string; userId: string };

/** Splits a body into text and mentions, for showing mentions as names. */
export function bodyParts(body: string): BodyPart[] {
	const out: BodyPart[] = [];
	let last = 0;
	for (const m of body.matchAll(TOKEN)) {
		if (m.index! > last) out.push({ text: body.slice(last, m.index) });
		out.push({ mention: m[1], userId: m[2] });
		last = m.index! + m[0].length;
	}
	if (last < body.length) out.push({ text: body.slice(last) });
	return out;
}

/** The body with tokens shown as `@Name` (for e-mails and previews). */
export function plainBody(body: string): string {
	return body.replace(TOKEN, (_, name: string) => `@${name}`);
}
