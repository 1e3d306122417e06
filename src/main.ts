import { createApp } from 'vue';
import { createPinia } from 'pinia';
import './styles';
import App from './App.vue';
import { router } from './router';
import { onUnauthorized } from './api/http';
import { useAuthStore } from './stores/auth';
import { resetSessionStores, sessionResetPlugin } from './stores/session';

const app = createApp(App);
const pinia = createPinia();
pinia.use(sessionResetPlugin);
app.use(pinia);
app.use(router);

// A session that expires mid-page: back to sign-in, then straight back here after it.
onUnauthorized(() => {
  const auth = useAuthStore(pinia);
  // Signed out already (the first "who am I?" answers 401 too): the router's guard handles that.
  if (!auth.signedIn) return;
  auth.setUser(null);
  const here = router.currentRoute.value;
  if (here.matched.some((r) => r.meta.public)) return resetSessionStores();
  // Reset once the pages have left, so none renders half-emptied stores on the way out; a page that
  // refuses to be left (unsaved notebook) keeps its work on screen.
  void router.replace({ name: 'sign-in', query: { expired: '1', ...(here.fullPath !== '/' ? { redirect: here.fullPath } : {}) } }).then((failure) => {
    if (!failure) resetSessionStores();
  });
});

app.mount('#app');
