import { onBeforeUnmount, ref, watchEffect, type Ref } from 'vue';

/** The name of the thing a page shows (a dataset, a notebook), shown as the last breadcrumb item. */
export const crumbDetail = ref<string | null>(null);

/** Call from a page's setup: keeps the breadcrumb's last item in step with `title` while mounted. */
export function useCrumb(title: Ref<string | null | undefined>) {
  watchEffect(() => {
    crumbDetail.value = title.value ?? null;
  });
  onBeforeUnmount(() => {
    crumbDetail.value = null;
  });
}
