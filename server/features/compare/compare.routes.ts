import type { Router } from 'express';
import type { Deps } from '../../deps.js';
import { registerReviewRoutes } from './review.routes.js';

/** Compare and review: review mode and the comparison sheet. */
export function registerCompareRoutes(r: Router, deps: Deps): void {
  registerReviewRoutes(r, deps);
}
