import { User } from '../../db/models/index.ts';

/** Names of the given users, for showing who did what (a removed account shows as null). */
export async function namesOf(ids: (string | null | undefined)[]): Promise<Map<string, string>> {
  const wanted = [...new Set(ids.filter((x): x is string => !!x))];
  if (wanted.length === 0) return new Map();
  const rows = await User.findAll({ where: { id: wanted }, attributes: ['id', 'name'] });
  return new Map(rows.map((u) => [u.id, u.name]));
}

export const person = (names: Map<string, string>, id: string | null | undefined) =>
  id ? { id, name: names.get(id) ?? null } : null;
