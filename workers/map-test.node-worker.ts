// Node worker_threads entry for the same API (benchmark and tests); the browser uses map-test.worker.ts.
import * as Comlink from 'comlink';
import nodeEndpoint from 'comlink/dist/esm/node-adapter.mjs';
import { parentPort } from 'node:worker_threads';
import { mapTestApi } from './map-test-api';

Comlink.expose(mapTestApi, nodeEndpoint(parentPort as never));
