/** @type {import('next').NextConfig} */
const nextConfig = {
  serverExternalPackages: ['sequelize', 'pg', 'pg-hstore', '@react-pdf/renderer', 'nodemailer', 'bcryptjs', 'pg-boss', 'piscina'],
  poweredByHeader: false,
  typedRoutes: false,
  // Static files too (proxy.ts sets these and the per-request CSP on pages and API answers).
  async headers() {
    return [
      {
        source: '/:path*',
        headers: [
          { key: 'X-Content-Type-Options', value: 'nosniff' },
          { key: 'Referrer-Policy', value: 'strict-origin-when-cross-origin' },
          { key: 'X-Frame-Options', value: 'DENY' },
        ],
      },
    ];
  },
};

export default nextConfig;
