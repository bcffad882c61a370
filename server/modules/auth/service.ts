import { Lab, Membership, User } from '../../db/models/index.ts';
import type { MeView, MembershipView } from '../../../shared/contracts/auth.ts';

export async function membershipsOf(userId: string): Promise<MembershipView[]> {
  const rows = await Membership.findAll({
    where: { userId },
    include: [{ model: Lab, attributes: ['id', 'name', 'slug'], required: true }],
    order: [[Lab, 'name', 'ASC']],
  });
  return rows.map((m) => {
    const lab = (m as unknown as { Lab: Lab }).Lab;
    return { labId: lab.id, labName: lab.name, labSlug: lab.slug, role: m.role };
  });
}

export async function meView(userId: string, via: MeView['via'], expiresAt: Date | undefined): Promise<MeView> {
  const user = await User.findByPk(userId, { attributes: ['id', 'email', 'name'], rejectOnEmpty: true });
  return {
    user: { id: user.id, email: user.email, name: user.name },
    memberships: await membershipsOf(userId),
    via,
    expiresAt: expiresAt?.toISOString() ?? null,
  };
}
