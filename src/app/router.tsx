import { createBrowserRouter, type RouteObject } from "react-router";
import { paths } from "../config/paths";
import { RouteError } from "./routes/route-error";

const page = (load: () => Promise<{ default: React.ComponentType }>): Pick<RouteObject, "lazy"> => ({
  lazy: () => load().then((m) => ({ Component: m.default })),
});

export const router = createBrowserRouter([
  { path: paths.signIn.path, ...page(() => import("./routes/auth/sign-in")), errorElement: <RouteError /> },
  { path: paths.safety.path, ...page(() => import("./routes/safety")), errorElement: <RouteError /> },
  { path: paths.shareParts.path, ...page(() => import("./routes/parts/share-parts")), errorElement: <RouteError /> },
  {
    ...page(() => import("./routes/app-layout")),
    errorElement: <RouteError />,
    children: [
      { path: paths.home.path, ...page(() => import("./routes/home-redirect")) },
      { path: paths.sites.path, ...page(() => import("./routes/sites/site-picker")) },
      { path: paths.admin.path, ...page(() => import("./routes/admin/admin-home")) },
      {
        path: paths.site.path,
        ...page(() => import("./routes/sites/site-layout")),
        children: [
          { index: true, ...page(() => import("./routes/sites/site-home")) },
          { path: "members", ...page(() => import("./routes/sites/members")) },
          { path: "photos", ...page(() => import("./routes/photos/photo-desk")) },
          { path: "photos/shoot-list", ...page(() => import("./routes/photos/shoot-list")) },
          { path: "photos/gallery", ...page(() => import("./routes/photos/gallery")) },
          { path: "parts", ...page(() => import("./routes/parts/parts-list")) },
          { path: "parts/print", ...page(() => import("./routes/parts/parts-print")) },
          { path: "parts/:lineId", ...page(() => import("./routes/parts/part-line")) },
          { path: "*", ...page(() => import("./routes/not-found")) },
        ],
      },
      { path: "*", ...page(() => import("./routes/not-found")) },
    ],
  },
]);
