import { Routes } from '@angular/router';
import { validIds } from '../core/valid-ids';

/**
 * The evaluation of one closed tender, for buyers and compliance. Mount as a componentless route
 * so the tender's `:id` reaches every screen as the `id` input, e.g. in TENDERS_ROUTES:
 *   { path: ':id/evaluation', canActivate: [roleGuard(['buyer', 'compliance'])],
 *     loadChildren: () => import('../awards/awards.routes').then((m) => m.AWARD_ROUTES) }
 * Every screen is lazy, so chart.js loads only with the run result.
 */
export const AWARD_ROUTES: Routes = [
  {
    path: '',
    title: 'Award scenarios',
    loadComponent: () => import('./scenario-overview/scenario-overview').then((m) => m.ScenarioOverview),
  },
  {
    path: 'compare',
    title: 'Compare runs',
    loadComponent: () => import('./run-compare/run-compare').then((m) => m.RunCompare),
  },
  {
    path: 'recommendation',
    title: 'Award recommendation',
    loadComponent: () => import('./recommendation-panel/recommendation-panel').then((m) => m.RecommendationPanel),
  },
  {
    path: 'audit',
    title: 'Audit trail',
    loadComponent: () => import('./audit-trail/audit-trail').then((m) => m.AuditTrail),
  },
  {
    path: 'runs/:runId',
    title: 'Run result',
    canMatch: [validIds],
    loadComponent: () => import('./run-result/run-result').then((m) => m.RunResult),
  },
  {
    path: 'runs/:runId/resilience',
    title: 'Resilience check',
    canMatch: [validIds],
    loadComponent: () => import('./resilience-table/resilience-table').then((m) => m.ResilienceTable),
  },
];
