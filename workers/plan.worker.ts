import * as Comlink from 'comlink';
import { planApi } from './plan-api';

Comlink.expose(planApi());
