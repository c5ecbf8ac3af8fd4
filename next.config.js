// Uploads through the Upload page's server action carry the whole file; allow the configured
// upload limit (LAPSEBANK_MAX_UPLOAD_MB, default 50) plus room for the form fields. The ingest
// pipeline itself refuses oversized files with a clear message.
const maxUploadMb = Number(process.env.LAPSEBANK_MAX_UPLOAD_MB) > 0 ? Number(process.env.LAPSEBANK_MAX_UPLOAD_MB) : 50;

/** @type {import('next').NextConfig} */
const nextConfig = {
  poweredByHeader: false,
  // Responses are not gzipped here: that is the TLS reverse proxy's job on a shared server (see
  // README), and on one machine it only costs the app process CPU (about 5 % of a busy server's).
  compress: false,
  // h5wasm (NetCDF export) is a 4 MB Emscripten module that finds its own files at run time: loaded from node_modules, not bundled.
  serverExternalPackages: ["better-sqlite3", "pg", "@prisma/adapter-better-sqlite3", "@prisma/adapter-pg", "csv-parse", "h5wasm"],
  experimental: {
    serverActions: { bodySizeLimit: `${Math.ceil(maxUploadMb) + 1}mb` },
    // proxy.ts sees only server-action posts not marked same-origin by the browser (forgeries, and
    // uploads from browsers without Fetch Metadata); Next buffers what its proxy sees, and past this
    // size would cut such an upload short.
    proxyClientMaxBodySize: `${Math.ceil(maxUploadMb) + 1}mb`,
  },
};

export default nextConfig;
