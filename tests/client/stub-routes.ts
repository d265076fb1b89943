import type { RouteRecordRaw } from 'vue-router';
import { defineComponent, h } from 'vue';
import { routes } from '../../src/router/routes';

const Stub = defineComponent({ render: () => h('div') });

/** The app's route table with every page swapped for an empty component, so guard tests load no views. */
export function stubbedRoutes(): RouteRecordRaw[] {
  const stub = (records: readonly RouteRecordRaw[]): RouteRecordRaw[] =>
    records.map(
      (record) =>
        ({
          ...record,
          component: Stub,
          children: record.children ? stub(record.children) : undefined,
        }) as RouteRecordRaw,
    );
  return stub(routes);
}
