// The package's self-contained ES module build (its default entry imports extensionless paths that
// Node's own loader, used by the build threads, cannot resolve); same API, typed by the package itself.
declare module "quickhull3d/dist/quickhull3d.js" {
  export { default, isPointInsideHull, QuickHull } from "quickhull3d/dist/index.js";
}
