// zod, configured once for every schema in the app. `jitless`: zod otherwise probes `new Function("")` when the first
// object schema is built, to compile fast parsers; under the page's Content-Security-Policy (no 'unsafe-eval') that
// probe is refused and reported as a violation on every workspace load. Our schemas parse small recipes and forms,
// so the interpreted parser costs nothing noticeable. Import `z` from here, never from 'zod' directly.
import { config, z } from 'zod';

config({ jitless: true });

export { z };
