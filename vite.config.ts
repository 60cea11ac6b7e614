import { fileURLToPath, URL } from 'node:url'
import { defineConfig } from 'vite'
import vue from '@vitejs/plugin-vue'
import vuetify from 'vite-plugin-vuetify'
import { firstLoadSize } from './build/first-load-size.ts'

const apiPort = Number(process.env.PORT ?? 3000)

export default defineConfig({
  plugins: [vue(), vuetify({ autoImport: true }), firstLoadSize()],
  resolve: {
    alias: { '@': fileURLToPath(new URL('./src', import.meta.url)) },
  },
  server: {
    proxy: { '/api': `http://127.0.0.1:${apiPort}` },
  },
  build: {
    outDir: 'dist/client',
    chunkSizeWarningLimit: 1500,
  },
})
