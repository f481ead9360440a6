// The Fenceline version recorded in workspace files (meta.last_written_by): package.json's.

import pkg from '../../package.json' with { type: 'json' };

export const SOFTWARE_VERSION: string = pkg.version;
