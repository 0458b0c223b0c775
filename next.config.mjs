/** @type {import('next').NextConfig} */
const nextConfig = {
  // Native and Node-only packages stay outside the server bundle.
  serverExternalPackages: ['sequelize', 'sqlite3', 'smtp-server', 'mailparser', 'nodemailer', 'h5wasm', 'bcryptjs'],
  poweredByHeader: false,
};

export default nextConfig;
