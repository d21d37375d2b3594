// Node worker_threads entry for the same API (benchmark and pool tests); the browser uses decompose.worker.ts.
import * as Comlink from 'comlink';
import nodeEndpoint from 'comlink/dist/esm/node-adapter.mjs';
import { parentPort } from 'node:worker_threads';
import { decomposeApi } from './decompose-api';

Comlink.expose(decomposeApi, nodeEndpoint(parentPort as never));
