// Tailwind CSS 3 through PostCSS; autoprefixer for the browsers Next.js targets.
const config = {
  plugins: {
    tailwindcss: {},
    autoprefixer: {},
  },
};

export default config;
