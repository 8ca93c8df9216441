import { User } from './User';
import { Run } from './Run';
import { RunOutput } from './RunOutput';
import { RunSnapshot } from './RunSnapshot';
import { RunCheckpoint } from './RunCheckpoint';
import { Session } from './Session';
import { ApiToken } from './ApiToken';
import { Cohort } from './Cohort';
import { CohortMember } from './CohortMember';
import { CohortTemplate } from './CohortTemplate';
import { Allocation } from './Allocation';
import { UsageEntry } from './UsageEntry';
import { Galaxy } from './Galaxy';
import { GalaxyFit } from './GalaxyFit';
import { GalaxySample } from './GalaxySample';

export { User, Run, RunOutput, RunSnapshot, RunCheckpoint, Session, ApiToken, Cohort, CohortMember, CohortTemplate, Allocation, UsageEntry, Galaxy, GalaxyFit, GalaxySample };
export const entities = [User, Run, RunOutput, RunSnapshot, RunCheckpoint, Session, ApiToken, Cohort, CohortMember, CohortTemplate, Allocation, UsageEntry, Galaxy, GalaxyFit, GalaxySample];
