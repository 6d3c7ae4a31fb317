/** What every router is built with: the store, the interpretation function and the limits (no module state). */
import type { interpret } from '../../lib/interpret.js';
import type { ServerConfig } from '../config.js';
import type { SurveyStore } from '../storage/survey-store.js';

export interface RouteContext {
  readonly config: ServerConfig;
  readonly store: SurveyStore;
  /** The pipeline (lib/interpret.ts) unless a test injects another. */
  readonly interpret: typeof interpret;
  readonly softwareVersion: string;
}
