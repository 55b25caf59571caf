import type { Routes } from '@angular/router';
import { adminGuard, signedInGuard, signedOutGuard } from './auth/auth-guards';
import { unsavedChangesGuard } from './register/unsaved-changes-guard';

export const routes: Routes = [
  {
    path: 'sign-in',
    title: 'Sign in · Proofline',
    canActivate: [signedOutGuard],
    loadComponent: () => import('./auth/sign-in').then((m) => m.SignIn),
  },
  {
    // The 300-node canvas benchmark (scripts/bench-canvas.ts); synthetic data, no API calls.
    path: 'canvas-bench',
    title: 'Canvas benchmark · Proofline',
    loadComponent: () => import('./canvas/bench/canvas-bench').then((m) => m.CanvasBench),
  },
  {
    // The 10,000-point results chart benchmark (scripts/bench-chart.ts); synthetic data, no API calls.
    path: 'chart-bench',
    title: 'Chart benchmark · Proofline',
    loadComponent: () => import('./results/bench/chart-bench').then((m) => m.ChartBench),
  },
  {
    path: '',
    canActivate: [signedInGuard],
    loadComponent: () => import('./shell/shell').then((m) => m.Shell),
    children: [
      { path: '', pathMatch: 'full', redirectTo: 'projects' },
      {
        path: 'projects',
        title: 'Projects · Proofline',
        loadComponent: () => import('./projects/project-list').then((m) => m.ProjectList),
      },
      {
        path: 'projects/:projectId',
        loadComponent: () => import('./projects/project-page').then((m) => m.ProjectPage),
      },
      {
        path: 'projects/:projectId/sifs/new',
        title: 'New SIF · Proofline',
        canDeactivate: [unsavedChangesGuard],
        loadComponent: () => import('./register/sif-editor').then((m) => m.SifEditor),
      },
      {
        path: 'projects/:projectId/sifs/:sifId',
        canDeactivate: [unsavedChangesGuard],
        loadComponent: () => import('./register/sif-editor').then((m) => m.SifEditor),
      },
      {
        path: 'projects/:projectId/sifs/:sifId/models',
        title: 'Models · Proofline',
        loadComponent: () => import('./models/model-list').then((m) => m.ModelList),
      },
      {
        path: 'projects/:projectId/sifs/:sifId/models/new-from-architecture',
        title: 'Architecture wizard · Proofline',
        loadComponent: () => import('./wizard/architecture-wizard').then((m) => m.ArchitectureWizard),
      },
      {
        path: 'projects/:projectId/sifs/:sifId/models/:modelId',
        title: 'Model · Proofline',
        loadComponent: () => import('./models/model-editor').then((m) => m.ModelEditor),
      },
      {
        path: 'projects/:projectId/sifs/:sifId/models/:modelId/results/:solveId',
        title: 'Results · Proofline',
        loadComponent: () => import('./results/results-page').then((m) => m.ResultsPage),
      },
      {
        path: 'projects/:projectId/members',
        title: 'Members · Proofline',
        loadComponent: () => import('./members/member-page').then((m) => m.MemberPage),
      },
      {
        path: 'devices',
        title: 'Device library · Proofline',
        loadComponent: () => import('./devices/device-library-page').then((m) => m.DeviceLibraryPage),
      },
      {
        path: 'devices/import',
        title: 'Import devices · Proofline',
        loadComponent: () => import('./devices/device-import').then((m) => m.DeviceImport),
      },
      {
        path: 'devices/new',
        title: 'New device record · Proofline',
        loadComponent: () => import('./devices/device-editor').then((m) => m.DeviceEditor),
      },
      {
        path: 'devices/:deviceId',
        title: 'Device record · Proofline',
        loadComponent: () => import('./devices/device-editor').then((m) => m.DeviceEditor),
      },
      {
        path: 'admin/users',
        title: 'User accounts · Proofline',
        canActivate: [adminGuard],
        loadComponent: () => import('./admin/user-admin-page').then((m) => m.UserAdminPage),
      },
      {
        path: 'reviews',
        title: 'Reviews · Proofline',
        loadComponent: () => import('./review/review-queue').then((m) => m.ReviewQueue),
      },
      {
        path: 'projects/:projectId/audit',
        title: 'Audit trail · Proofline',
        loadComponent: () => import('./review/audit-page').then((m) => m.AuditPage),
      },
      {
        path: 'admin/mail',
        title: 'Sent mail · Proofline',
        canActivate: [adminGuard],
        loadComponent: () => import('./review/sent-mail-page').then((m) => m.SentMailPage),
      },
      {
        path: 'about',
        title: 'About · Proofline',
        loadComponent: () => import('./shell/about').then((m) => m.About),
      },
      {
        path: '**',
        title: 'Not found · Proofline',
        loadComponent: () => import('./shell/not-found').then((m) => m.NotFound),
      },
    ],
  },
];
