// Imported first by the production server: the build runs in production mode unless told
// otherwise (as react-router-serve did). It must be a module of its own, evaluated before any
// import that loads React: ES imports run before the importing file's own lines, and React picked
// in development mode beside react-dom's production server renderer answers every page with 500.
process.env.NODE_ENV ??= "production";
