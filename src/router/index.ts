import { createRouter, createWebHistory, type RouteLocationNormalized, type RouteRecordRaw } from 'vue-router';
import { useAuthStore } from '../stores/auth';
import { useGroupsStore } from '../stores/groups';
import SignInView from '../views/SignInView.vue';

declare module 'vue-router' {
  interface RouteMeta {
    /** Reachable signed out (sign-in, invitation, reset). */
    public?: boolean;
    /** Site admins only. */
    admin?: boolean;
    /** Last breadcrumb item and document title. */
    title?: string;
    /** Puts the route in the group's section tabs (under the top bar), ordered by `order`. */
    groupNav?: { label: string; order: number };
    /** Puts the route in the admin section tabs. */
    adminNav?: { label: string; order: number };
    /** For child pages: the route name of the section page the breadcrumb links back to. */
    parent?: string;
  }
}

const appChildren: RouteRecordRaw[] = [
  { path: '', name: 'home', component: () => import('../views/HomeView.vue'), meta: { title: 'Home' } },
  { path: 'groups', name: 'groups', component: () => import('../views/GroupsView.vue'), meta: { title: 'Your groups' } },
  {
    path: 'groups/:groupId(\\d+)',
    name: 'group',
    component: () => import('../views/GroupView.vue'),
    meta: { title: 'Overview', groupNav: { label: 'Overview', order: 0 } },
  },
  {
    path: 'groups/:groupId(\\d+)/datasets',
    name: 'datasets',
    component: () => import('../views/DatasetsView.vue'),
    meta: { title: 'Datasets', groupNav: { label: 'Datasets', order: 40 } },
  },
  {
    path: 'groups/:groupId(\\d+)/datasets/:datasetId(\\d+)',
    name: 'dataset',
    component: () => import('../views/DatasetView.vue'),
    meta: { title: 'Dataset', parent: 'datasets' },
  },
  { path: 'admin', redirect: { name: 'admin-users' } },
  {
    path: 'admin/users',
    name: 'admin-users',
    component: () => import('../views/AdminUsersView.vue'),
    meta: { admin: true, title: 'Users', adminNav: { label: 'Users', order: 0 } },
  },
  {
    path: 'admin/limits',
    name: 'admin-limits',
    component: () => import('../views/AdminLimitsView.vue'),
    meta: { admin: true, title: 'Sandbox limits', adminNav: { label: 'Sandbox limits', order: 10 } },
  },
  {
    path: 'admin/usage',
    name: 'admin-usage',
    component: () => import('../views/AdminUsageView.vue'),
    meta: { admin: true, title: 'Usage', adminNav: { label: 'Usage', order: 20 } },
  },
  {
    path: 'admin/outbox',
    name: 'admin-outbox',
    component: () => import('../views/AdminOutboxView.vue'),
    meta: { admin: true, title: 'Outbox', adminNav: { label: 'Outbox', order: 30 } },
  },
  {
    path: 'groups/:groupId(\\d+)/notebooks',
    name: 'notebooks',
    component: () => import('../views/NotebooksView.vue'),
    meta: { title: 'Notebooks', groupNav: { label: 'Notebooks', order: 10 } },
  },
  {
    path: 'groups/:groupId(\\d+)/notebooks/:notebookId(\\d+)',
    name: 'notebook',
    component: () => import('../views/NotebookView.vue'),
    meta: { title: 'Notebook', parent: 'notebooks' },
  },
  {
    path: 'groups/:groupId(\\d+)/recipes',
    name: 'recipes',
    component: () => import('../views/RecipesView.vue'),
    meta: { title: 'Recipes', groupNav: { label: 'Recipes', order: 20 } },
  },
  {
    path: 'groups/:groupId(\\d+)/recipes/:recipeId(\\d+)',
    name: 'recipe',
    component: () => import('../views/RecipeView.vue'),
    meta: { title: 'Recipe', parent: 'recipes' },
  },
  {
    path: 'groups/:groupId(\\d+)/sweeps',
    name: 'sweeps',
    component: () => import('../views/SweepsView.vue'),
    meta: { title: 'Sweeps', groupNav: { label: 'Sweeps', order: 30 } },
  },
  {
    path: 'groups/:groupId(\\d+)/sweeps/:sweepId(\\d+)',
    name: 'sweep',
    component: () => import('../views/SweepView.vue'),
    meta: { title: 'Sweep', parent: 'sweeps' },
  },
  // console routes go here (notebooks, recipes, sweeps): children of `app`, group pages under
  // 'groups/:groupId(\\d+)/...' with meta.groupNav to appear in the group's tabs.
  { path: ':pathMatch(.*)*', name: 'not-found', component: () => import('../views/NotFoundView.vue'), meta: { title: 'Not found' } },
];

const routes: RouteRecordRaw[] = [
  { path: '/sign-in', name: 'sign-in', component: SignInView, meta: { public: true, title: 'Sign in' } },
  {
    // The invitation e-mail links to /invite/:token; /invitations/:token is kept as an alias.
    path: '/invite/:token',
    alias: '/invitations/:token',
    name: 'accept-invitation',
    component: () => import('../views/AcceptInvitationView.vue'),
    meta: { public: true, title: 'Accept invitation' },
  },
  {
    path: '/reset-password/:token?',
    name: 'reset-password',
    component: () => import('../views/ResetPasswordView.vue'),
    meta: { public: true, title: 'Reset password' },
  },
  { path: '/', name: 'app', component: () => import('../components/frame/AppFrame.vue'), children: appChildren },
];

export const router = createRouter({
  history: createWebHistory(),
  routes,
  scrollBehavior: (_to, _from, saved) => saved ?? { top: 0 },
});

/** The group a route is about, from its `groupId` param. */
export function groupIdOf(route: RouteLocationNormalized): number | null {
  const raw = route.params.groupId;
  const n = Number(Array.isArray(raw) ? raw[0] : raw);
  return Number.isInteger(n) && n > 0 ? n : null;
}

router.beforeEach(async (to) => {
  const auth = useAuthStore();
  await auth.load();
  const isPublic = to.matched.some((r) => r.meta.public);

  if (!auth.signedIn) {
    if (isPublic) return true;
    return { name: 'sign-in', query: to.fullPath !== '/' ? { redirect: to.fullPath } : {} };
  }
  // A signed-in user has no business on the sign-in page; invitation/reset pages stay reachable.
  if (to.name === 'sign-in') return { name: 'home' };
  if (isPublic) return true;

  if (to.matched.some((r) => r.meta.admin) && !auth.isAdmin) return { name: 'home' };

  const groups = useGroupsStore();
  try {
    await groups.load();
  } catch {
    // The frame shows the error; let the page render rather than loop.
  }
  const gid = groupIdOf(to);
  // Not (or no longer) a member by what we loaded: ask again, membership may have changed meanwhile.
  if (gid !== null && groups.roleIn(gid) === null && groups.loaded) await groups.load(true).catch(() => undefined);
  if (gid !== null) groups.setCurrent(gid);
  if (to.name === 'home') {
    const g = await groups.landing();
    return g ? { name: 'group', params: { groupId: g.id } } : { name: 'groups' };
  }
  return true;
});

router.afterEach((to) => {
  const t = to.meta.title;
  document.title = t ? `${t} · Comoving` : 'Comoving';
});
