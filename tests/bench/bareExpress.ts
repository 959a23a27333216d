// The yardstick for answer saves: Express with a JSON body parser and one PUT route that
// answers at once, in its own process like the real server. `node --import tsx` this file.
import express from 'express'

const app = express()
app.disable('x-powered-by')
app.use(express.json({ limit: '100kb' }))
app.put('/api/player/answers/:trialIndex', (req, res) => {
  res.json({
    saved: true,
    trialIndex: Number(req.params.trialIndex),
    size: Object.keys(req.body).length,
  })
})
app.get('/api/health', (_req, res) => {
  res.json({ status: 'ok' })
})
app.listen(Number(process.env.PORT))
