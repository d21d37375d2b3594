import * as Comlink from 'comlink';
import { mapTestApi } from './map-test-api';

Comlink.expose(mapTestApi);
