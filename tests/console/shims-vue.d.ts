// Lets the repository's tsc (NodeNext, no Vue plugin) type the console tests' .vue imports; the
// components themselves are checked by vue-tsc -p console/tsconfig.json.
declare module '*.vue' {
  import type { DefineComponent } from 'vue';
  const component: DefineComponent<object, object, unknown>;
  export default component;
}
