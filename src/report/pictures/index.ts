export { choroplethSvg, type ChoroplethInput, type Picture } from './choropleth.js';
export { moranScatterData, moranScatterSvg, type ScatterData, type Edges } from './moran-scatter.js';
export { symmetricClasses, quantileClasses, colourOf, DIVERGING, SEQUENTIAL, NO_VALUE, type Classes } from './classes.js';
export { categoryMapSvg, type CategoryMapInput, type MapCategory } from './category-map.js';
export { rateMapsSvg, type RateMapsInput } from './rate-maps.js';
