/**
 * The fake identity provider's own pages: plain HTML with labels and landmarks so they pass axe
 * like the rest of the demo. They look like a generic hospital directory, not like Ferrolane.
 */
export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!)
}

const STYLE = `body{font-family:system-ui,sans-serif;background:#eef1f4;color:#1b2430;margin:0}
main{max-width:26rem;margin:3rem auto;background:#fff;padding:1.5rem 2rem;border-radius:6px;box-shadow:0 1px 3px #0003}
h1{font-size:1.4rem}label{display:block;margin-top:1rem;font-weight:600}
input{width:100%;box-sizing:border-box;padding:.5rem;margin-top:.25rem;border:1px solid #5b6673;border-radius:4px;font-size:1rem}
button{margin-top:1.25rem;padding:.6rem 1rem;font-size:1rem;border-radius:4px;border:1px solid
  #14406b;background:#14406b;color:#fff;cursor:pointer}
button.secondary{background:#fff;color:#14406b}.error{color:#9b1c1c;font-weight:600}.note{font-size:.9rem;color:#3d4854}`

export function page(title: string, body: string): string {
  return `<!DOCTYPE html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(title)} · Kestrel Vale staff directory (demo)</title><style>${STYLE}</style></head>
<body><main><p class="note">Kestrel Vale staff directory — invented demo identity provider</p>
<h1>${escapeHtml(title)}</h1>${body}</main></body></html>`
}

export function loginPage(uid: string, clientName: string, error?: string, email = ''): string {
  return page(
    'Sign in to the staff directory',
    `<p>${escapeHtml(clientName)} asks you to sign in.</p>
${error ? `<p class="error" role="alert">${escapeHtml(error)}</p>` : ''}
<form method="post" action="/interaction/${encodeURIComponent(uid)}/login">
<label for="login">Work e-mail</label><input id="login" name="login" type="email" autocomplete="username" required
  value="${escapeHtml(email)}">
<label for="password">Directory password</label><input id="password" name="password" type="password"
  autocomplete="current-password" required>
<button type="submit">Sign in</button></form>`,
  )
}

export function consentPage(uid: string, clientName: string, scopes: string[]): string {
  return page(
    'Allow access',
    `<p>${escapeHtml(clientName)} would like to know who you are: ${escapeHtml(scopes.join(', '))}.</p>
<form method="post" action="/interaction/${encodeURIComponent(uid)}/confirm"><button type="submit">Allow</button></form>
<form method="post" action="/interaction/${encodeURIComponent(uid)}/abort">
<button type="submit" class="secondary">Do not allow</button></form>`,
  )
}

export function logoutPage(form: string): string {
  return page(
    'Sign out of the staff directory?',
    `${form}<button type="submit" form="op.logoutForm" value="yes" name="logout">Yes, sign me out</button>
<button type="submit" form="op.logoutForm" class="secondary">No, stay signed in</button>`,
  )
}

export function signedOutPage(): string {
  return page('You are signed out of the staff directory', '<p>You can close this window.</p>')
}

export function errorPage(message: string): string {
  return page('The staff directory could not finish', `<p class="error" role="alert">${escapeHtml(message)}</p>`)
}
