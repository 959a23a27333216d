// Cautions shown to players wherever the work can hurt; the client shows the same words.

export const LISTENING_CAUTION =
  'Protect your hearing: start with the volume low, raise it slowly to a comfortable level, ' +
  'keep it there for the whole session and take a break if your ears feel tired.'

export const STRING_FITTING_CAUTION =
  'Fitting strings: a string under tension can snap and whip back, so wear eye protection, ' +
  'bring each string up to pitch slowly and keep the bridge upright as you tune. Follow your ' +
  "instrument maker's advice and ask a luthier when you are unsure."

export const LOCAL_RULES_NOTE =
  'Your answers are kept under a player code; where local rules on personal data say more, ' +
  'they apply.'
