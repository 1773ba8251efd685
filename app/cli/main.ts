// Placeholder entry; the command line is being written (see app/cli/).
import { ewaldForcesThreads } from './parallelEwald';
export { ewaldForcesThreads };
