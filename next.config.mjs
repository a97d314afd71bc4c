/** @type {import('next').NextConfig} */
const nextConfig = {
  serverExternalPackages: ['sequelize', 'pg', 'pg-hstore', '@react-pdf/renderer', 'nodemailer', 'bcryptjs'],
  poweredByHeader: false,
  typedRoutes: false,
};

export default nextConfig;
