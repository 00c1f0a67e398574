// For the root `tsc` run (which does not know Vue SFCs): a .vue import is a component.
// vue-tsc, run with console/tsconfig.json, checks these imports with their real types.
declare module '*.vue' {
  import type { DefineComponent } from 'vue';
  const component: DefineComponent<Record<string, unknown>, Record<string, unknown>, unknown>;
  export default component;
}
