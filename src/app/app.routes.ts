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
        path: 'projects/:projectId/members',
        title: 'Members · Proofline',
        loadComponent: () => import('./members/member-page').then((m) => m.MemberPage),
      },
      {
        path: 'admin/users',
        title: 'User accounts · Proofline',
        canActivate: [adminGuard],
        loadComponent: () => import('./admin/user-admin-page').then((m) => m.UserAdminPage),
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
