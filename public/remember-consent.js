// Remembers a research-consent answer given before the page's own scripts have taken over (see
// app/routes/play/join-code.tsx): a file of our own, so the Content-Security-Policy allows it
// without an inline script.
document.addEventListener(
  'change',
  function (e) {
    var t = e.target;
    if (t && t.name === 'consent') window.__parleyConsent = { path: location.pathname, value: t.value };
  },
  true,
);
