import * as Comlink from 'comlink';
import { decomposeApi } from './decompose-api';

Comlink.expose(decomposeApi);
