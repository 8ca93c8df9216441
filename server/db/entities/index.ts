import { User } from './User';
import { Run } from './Run';
import { RunOutput } from './RunOutput';
import { RunSnapshot } from './RunSnapshot';

export { User, Run, RunOutput, RunSnapshot };
export const entities = [User, Run, RunOutput, RunSnapshot];
