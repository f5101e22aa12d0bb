/** The tool's version, from package.json (bundlers inline it; one source for the CLI, editor and files). */
import { version } from '../../package.json';

export const TOOL_VERSION: string = version;
