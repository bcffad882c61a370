import { useOutletContext } from 'react-router-dom';
import type { MeView, MembershipView } from '../../shared/contracts/auth.ts';

export interface LabOutlet { me: MeView; membership: MembershipView }

/** The signed-in user and their membership of the lab the page is about. */
export const useLab = () => useOutletContext<LabOutlet>();
