import type { Role } from '../../shared/api/accounts';

// Invented demo people, for development and tests only. None of them is a real
// person; the addresses use the reserved .example domain.
export interface DemoIdentity {
  id: number;
  login: string;
  name: string;
  email: string;
  role: Role;
}

export const DEMO_IDENTITIES: readonly DemoIdentity[] = [
  { id: 730101, login: 'ilse-varga', name: 'Ilse Varga', email: 'ilse.varga@infall.example', role: 'instructor' },
  { id: 730102, login: 'amira-solberg', name: 'Amira Solberg', email: 'amira.solberg@infall.example', role: 'student' },
  { id: 730103, login: 'jonas-achterberg', name: 'Jonas Achterberg', email: 'jonas.achterberg@infall.example', role: 'student' },
  { id: 730104, login: 'priya-ndlovu', name: 'Priya Ndlovu', email: 'priya.ndlovu@infall.example', role: 'student' },
  { id: 730105, login: 'teodora-vance', name: 'Teodora Vance', email: 'teodora.vance@infall.example', role: 'researcher' },
  { id: 730106, login: 'rafael-okoye', name: 'Rafael Okoye', email: 'rafael.okoye@infall.example', role: 'admin' },
];

/** The invented cohort the three demo students belong to. */
export const DEMO_COHORT = {
  name: 'Galaxy Dynamics Lab, autumn (invented)',
  enrolmentCode: 'VRTX-42QM',
  instructorLogin: 'ilse-varga',
  studentLogins: ['amira-solberg', 'jonas-achterberg', 'priya-ndlovu'],
  quota: { maxParticles: 3_000, maxSteps: 8_000, maxConcurrentRuns: 2, dailyInteractions: 1e11 },
} as const;
