/**
 * Actions and object sources that exist on every page: go to each section, switch group, theme,
 * sign out, new notebook, open notebooks / recipes / datasets / sweeps / members, insert snippets.
 * Lists are fetched through the api modules each time the bar opens; an endpoint that does not
 * answer (404 before it is built, 403 for a role) simply contributes nothing.
 */
import type { Router } from 'vue-router';
import { http } from '../../api/http';
import { listNotebooks } from '../../api/notebooks';
import { datasetsApi } from '../../api/datasets';
import { groupsApi } from '../../api/groups';
import { useAuthStore } from '../../stores/auth';
import { useGroupsStore } from '../../stores/groups';
import { useThemeStore } from '../../stores/theme';
import { useNotebooksStore } from '../../stores/notebooks';
import { useCommandBarStore, type CommandAction } from '../../stores/commandBar';
import { activeEditor } from '../editor/activeEditor';
import { snippets } from './snippets';

/** The route's own id param (the one that is not groupId), so we need not know other views' names. */
function idParamOf(router: Router, name: string): string | null {
  const rec = router.getRoutes().find((r) => r.name === name);
  if (!rec) return null;
  const params = [...rec.path.matchAll(/:([A-Za-z_]+)/g)].map((m) => m[1]).filter((p) => p !== 'groupId');
  return params[0] ?? null;
}

interface Named {
  id: number;
  name?: string;
  title?: string;
  updatedAt?: string;
  ownerName?: string;
}

async function tolerantList(path: string, key: string): Promise<Named[]> {
  try {
    const r = await http.get<Record<string, Named[]>>(path);
    return Array.isArray(r[key]) ? r[key] : [];
  } catch {
    return [];
  }
}

export function installGlobalActions(router: Router): () => void {
  const bar = useCommandBarStore();
  const auth = useAuthStore();
  const groups = useGroupsStore();
  const theme = useThemeStore();
  const notebooks = useNotebooksStore();
  const gid = () => groups.currentId;

  const staticActions: CommandAction[] = [
    {
      id: 'app.theme',
      title: 'Switch light / dark theme',
      section: 'Settings',
      keywords: 'theme dark light colour mode appearance',
      run: () => theme.toggle(),
    },
    {
      id: 'app.sign-out',
      title: 'Sign out',
      section: 'Account',
      keywords: 'log out leave logout',
      run: async () => {
        await auth.signOut();
        await router.push({ name: 'sign-in' });
      },
    },
    {
      id: 'notebook.new',
      title: 'New notebook…',
      section: 'Notebooks',
      keywords: 'create add notebook new',
      enabled: () => gid() !== null && groups.canEdit,
      prompt: { label: 'Title of the new notebook', placeholder: 'e.g. Distances for the spring survey', initial: 'Untitled notebook' },
      run: async (title?: string) => {
        const g = gid();
        if (g === null) return;
        const nb = await notebooks.create(g, (title ?? '').trim() || 'Untitled notebook');
        await router.push({ name: 'notebook', params: { groupId: g, notebookId: nb.id } });
      },
    },
    ...snippets.map<CommandAction>((s) => ({
      id: `snippet.${s.id}`,
      title: `Insert: ${s.title}`,
      section: 'Snippets',
      keywords: `snippet insert api ${s.keywords}`,
      hint: s.text.split('\n')[0],
      enabled: () => activeEditor.value !== null,
      run: () => {
        const ed = activeEditor.value;
        if (!ed) return;
        setTimeout(() => ed.insert(s.text), 0);
      },
    })),
  ];

  const offStatic = bar.register(staticActions);

  // Section pages, read from the router so pages added later by other views appear by themselves.
  const offPages = bar.registerSource('pages', async () => {
    const out: CommandAction[] = [];
    for (const r of router.getRoutes()) {
      const name = typeof r.name === 'string' ? r.name : null;
      if (!name) continue;
      if (r.meta.groupNav && gid() !== null) {
        out.push({
          id: `go.${name}`,
          title: `Go to ${r.meta.groupNav.label}`,
          section: 'Go to',
          keywords: `open page ${name} ${groups.current?.name ?? ''}`,
          hint: groups.current?.name,
          run: () => void router.push({ name, params: { groupId: gid() ?? 0 } }),
        });
      }
      if (r.meta.adminNav && auth.isAdmin) {
        out.push({
          id: `go.${name}`,
          title: `Admin: ${r.meta.adminNav.label}`,
          section: 'Settings',
          keywords: `admin settings site ${name}`,
          run: () => void router.push({ name }),
        });
      }
    }
    if (router.hasRoute('groups'))
      out.push({ id: 'go.groups', title: 'Go to your groups', section: 'Go to', keywords: 'groups list', run: () => void router.push({ name: 'groups' }) });
    return out;
  });

  const offGroups = bar.registerSource('groups', async () =>
    groups.groups
      .filter((g) => g.id !== gid())
      .map<CommandAction>((g) => ({
        id: `group.${g.id}`,
        title: `Switch to ${g.name}`,
        section: 'Groups',
        keywords: 'group switch change',
        hint: g.role,
        run: () => void router.push({ name: 'group', params: { groupId: g.id } }),
      })),
  );

  const offNotebooks = bar.registerSource('notebooks', async () => {
    const g = gid();
    if (g === null) return [];
    const r = await listNotebooks(g, { sort: 'updated' });
    return r.notebooks.map<CommandAction>((n) => ({
      id: `open.notebook.${n.id}`,
      title: n.title,
      section: 'Notebooks',
      keywords: `notebook open ${n.ownerName}`,
      hint: `${n.ownerName} · v${n.version}`,
      run: () => void router.push({ name: 'notebook', params: { groupId: g, notebookId: n.id } }),
    }));
  });

  const offDatasets = bar.registerSource('datasets', async () => {
    const g = gid();
    if (g === null) return [];
    const r = await datasetsApi.list(g);
    const param = idParamOf(router, 'dataset');
    return r.datasets.map<CommandAction>((d) => ({
      id: `open.dataset.${d.id}`,
      title: d.name,
      section: 'Datasets',
      keywords: `dataset data table ${d.kind}`,
      hint: `${d.kind} · ${d.rowCount} rows`,
      run: () =>
        void (param
          ? router.push({ name: 'dataset', params: { groupId: g, [param]: d.id } })
          : router.push({ name: 'datasets', params: { groupId: g } })),
    }));
  });

  function objectSource(kind: 'recipe' | 'sweep', listKey: string) {
    return async (): Promise<CommandAction[]> => {
      const g = gid();
      if (g === null) return [];
      const items = await tolerantList(`/api/groups/${g}/${listKey}`, listKey);
      const one = idParamOf(router, kind);
      const list = router.hasRoute(listKey) ? listKey : null;
      if (!one && !list) return [];
      return items.map<CommandAction>((o) => ({
        id: `open.${kind}.${o.id}`,
        title: o.name ?? o.title ?? `${kind} ${o.id}`,
        section: kind === 'recipe' ? 'Recipes' : 'Sweeps',
        keywords: `${kind} open`,
        hint: o.ownerName,
        run: () =>
          void (one
            ? router.push({ name: kind, params: { groupId: g, [one]: o.id } })
            : router.push({ name: list as string, params: { groupId: g } })),
      }));
    };
  }
  const offRecipes = bar.registerSource('recipes', objectSource('recipe', 'recipes'));
  const offSweeps = bar.registerSource('sweeps', objectSource('sweep', 'sweeps'));

  const offMembers = bar.registerSource('members', async () => {
    const g = gid();
    if (g === null) return [];
    const r = await groupsApi.members(g);
    const target = router.hasRoute('members') ? 'members' : 'group';
    return r.members.map<CommandAction>((m) => ({
      id: `member.${g}.${m.userId}`,
      title: m.name,
      section: 'Members',
      keywords: `member person ${m.email} ${m.role}`,
      hint: `${m.role} · ${m.email}`,
      run: () => void router.push({ name: target, params: { groupId: g } }),
    }));
  });

  return () => {
    offStatic();
    for (const off of [offPages, offGroups, offNotebooks, offDatasets, offRecipes, offSweeps, offMembers]) off();
  };
}
