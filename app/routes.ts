import { type RouteConfig, index, layout, prefix, route } from "@react-router/dev/routes";

export default [
  index("routes/home.tsx"),
  route("sign-in", "routes/sign-in.tsx"),
  route("sign-out", "routes/sign-out.tsx"),
  route("invitation/:token", "routes/invitation.tsx"),
  route("password/forgot", "routes/password-forgot.tsx"),
  route("password/reset/:token", "routes/password-reset.tsx"),

  // Everything below needs a signed-in person; the layout's loader checks it.
  layout("routes/signed-in-layout.tsx", [
    route("dashboard", "routes/dashboard.tsx"),
    route("account", "routes/account.tsx"),
    route("courses/new", "routes/course-new.tsx"),
    route("fit-check", "routes/fit-check.tsx"),
    route("courses/:courseId", "routes/course.tsx"),
    ...prefix("admin", [
      route("people", "routes/admin-people.tsx"),
      route("mail", "routes/admin-mail.tsx"),
      route("audit", "routes/admin-audit.tsx"),
    ]),
  ]),

  // JSON API (resource routes).
  ...prefix("api", [route("me", "routes/api-me.ts"), route("fit", "routes/api-fit.ts")]),

  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
