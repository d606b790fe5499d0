// embed.html: reads its fragment (#scenario=<encodeURIComponent(JSON)>&views=side,end
// [&interactive=1]) into the one <spar-figure> of the page, and follows later changes of it.
import './embed.js';

function fromFragment() {
  const fig = document.getElementById('figure');
  const params = new URLSearchParams(location.hash.replace(/^#/, ''));
  const scenario = params.get('scenario');
  const views = params.get('views');
  if (views !== null) fig.setAttribute('views', views);
  else fig.removeAttribute('views');
  if (params.has('interactive') && params.get('interactive') !== '0') fig.setAttribute('interactive', '');
  else fig.removeAttribute('interactive');
  if (scenario !== null) fig.setAttribute('scenario', scenario);
  else fig.removeAttribute('scenario');
}

fromFragment();
window.addEventListener('hashchange', fromFragment);
